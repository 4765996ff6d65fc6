import type { Node } from "./node";
import type { Atom } from "./types";

/** Listed atoms of a layered compound stop once what is left of their total mass is below this. */
const ATOM_TAIL = 1e-18;
/** At most this many atoms are listed; a compound needing more is discretised instead. */
const MAX_ATOMS = 4096;

export interface LayerCompoundAtoms {
  atoms: Atom[];
  /** the atom masses by number of claims at the limit (m_k at index k) */
  byCount: number[];
  /** bound on the atom mass not listed (plus the rounding of the listed masses): an absolute CF error */
  unlisted: number;
}

/**
 * Atoms of S = Y_1 + ... + Y_N when each claim Y has atoms a0 at 0 and a1 at v (a per-claim layer: v = c l) and is
 * otherwise continuous. S sits on an atom only when every claim does, so its atoms are at k v with masses
 * m_k = sum_n P(N = n) C(n, k) a1^k a0^(n - k), whose generating function is P_N(a0 + a1 z): the compound of N with
 * the defective two-point severity (a0, a1). For counts of the (a, b, 0) and (a, b, 1) classes that compound follows
 * the Panjer recursion with a one-term severity (Klugman, Panjer & Willmot, Loss Models, recursive formula for the
 * (a, b, 1) class, which allows a defective severity):
 *   m_0 = P_N(a0),  m_1 = (c1 a1 + (a + b) a1 m_0) / (1 - a a0),  m_k = (a + b / k) a1 m_{k-1} / (1 - a a0) (k >= 2),
 * run in logarithms from the first non-zero mass so that large expected counts do not underflow. The total atom
 * mass is P_N(a0 + a1), so the mass left unlisted is known. Returns null when the count has no such recursion or
 * the atoms are too many to list.
 */
export function layerCompoundAtoms(N: Node, a0: number, a1: number, v: number): LayerCompoundAtoms | null {
  const pan = N.panjer;
  if (!pan || !N.countCgf) return null;
  const logPgf = (z: number): number => {
    if (z <= 0) return N.p0 !== undefined && N.p0 > 0 ? Math.log(N.p0) : -Infinity;
    const re = new Float64Array(1);
    const im = new Float64Array(1);
    N.countCgf!(Float64Array.of(Math.log(z)), Float64Array.of(0), re, im);
    return re[0];
  };
  const total = Math.exp(logPgf(a0 + a1));
  const atoms: Atom[] = [];
  if (!(total > ATOM_TAIL)) return { atoms, byCount: [], unlisted: Math.max(total, 0) };
  if (!(a1 > 0) || !Number.isFinite(v)) {
    // only the atom at 0 (no limit, or no claim reaches it)
    return { atoms: [{ x: 0, p: total }], byCount: [total], unlisted: 16 * Number.EPSILON * total };
  }
  const { a, b } = pan;
  const c1 = pan.c1 ?? 0;
  const inv = 1 / (1 - a * a0);
  let logM = logPgf(a0);
  const m0 = Math.exp(logM);
  let k: number;
  let sum = 0;
  if (m0 > 0) {
    atoms.push({ x: 0, p: m0 });
    sum += m0;
  }
  // m_1: in logarithms from m_0 for (a, b, 0) counts (m_0 may underflow), in linear terms when the (a, b, 1) term
  // c1 a1 joins (it may make m_1 non-zero when m_0 is zero)
  const logM1 = c1 === 0 ? logM + Math.log((a + b) * a1 * inv) : Math.log((c1 * a1 + (a + b) * a1 * m0) * inv);
  if (!(logM1 > -Infinity)) return atoms.length > 0 && total - sum <= ATOM_TAIL ? { atoms, byCount: [m0], unlisted: Math.max(total - sum, 0) + 16 * Number.EPSILON * total } : null;
  k = 1;
  logM = logM1;
  const logStep = (kk: number) => Math.log((a + b / kk) * a1 * inv);
  // masses rise to a mode, then each is the last times (a + b / k) a1 / (1 - a a0), a ratio that falls with k: past
  // the point where it is below 1, the rest is at most m_k r / (1 - r), a geometric series
  let tailBound = Infinity;
  const byCount = [m0];
  for (;;) {
    const m = Math.exp(logM);
    byCount.push(m);
    if (m > 0) atoms.push({ x: k * v, p: m });
    sum += m;
    if (atoms.length > MAX_ATOMS) return null;
    if (!(a + b / (k + 1) > 0)) {
      tailBound = 0; // binomial counts: no atom beyond n claims
      break;
    }
    const lstep = logStep(k + 1);
    if (lstep < 0) {
      const r = Math.exp(lstep);
      tailBound = (m * r) / (1 - r);
      if (tailBound <= ATOM_TAIL) break;
    }
    logM += lstep;
    k++;
  }
  // each listed mass comes from k steps of a recursion in logarithms: relative error <= 4 k eps (1 + |log m|)
  const rounding = 4 * (k + 2) * Number.EPSILON * (1 + Math.abs(Math.log(Math.max(total, 1e-300)))) * total;
  return { atoms, byCount, unlisted: tailBound + rounding };
}

/**
 * Jumps of the density of such a compound's continuous part. Near k v + start the density steps up where k claims sit
 * at the limit, one claim starts its continuous part (density fStart) and the rest are 0; near k v it steps down where
 * k - 1 claims sit at the limit and one claim's continuous part ends (density fEnd). With w_k = sum_n P(N = n)
 * n! / (k! (n - k - 1)!) a1^k a0^(n-k-1), whose generating function is P_N'(a0 + a1 z), the jumps are fStart w_k at
 * k v + start and -fEnd w_{k-1} at k v (configurations with two or more continuous claims have continuous densities).
 * For the (a, b, 1) class (1 - a s) P'(s) = (a + b) P(s) + c1 (from the recursion), so
 * w_k = ((a + b) m_k + c1 [k = 0] + a a1 w_{k-1}) / (1 - a a0).
 */
export function layerCompoundJumps(N: Node, a0: number, a1: number, v: number, byCount: number[], edges: { start: number; fStart: number; fEnd: number }): { at: number; size: number }[] {
  const pan = N.panjer;
  if (!pan || !(Number.isFinite(edges.fStart) && Number.isFinite(edges.fEnd))) return [];
  const { a, b } = pan;
  const c1 = pan.c1 ?? 0;
  const inv = 1 / (1 - a * a0);
  const out: { at: number; size: number }[] = [];
  let wPrev = 0;
  const K = Number.isFinite(v) && a1 > 0 ? byCount.length : 1;
  for (let k = 0; k <= K; k++) {
    const m = k < byCount.length ? byCount[k] : 0;
    const w = ((a + b) * m + (k === 0 ? c1 : 0) + a * a1 * wPrev) * inv;
    if (!Number.isFinite(v) || a1 === 0) {
      if (k === 0) out.push({ at: edges.start, size: edges.fStart * w });
      break;
    }
    if (edges.start === 0) out.push({ at: k * v, size: edges.fStart * w - edges.fEnd * wPrev });
    else {
      out.push({ at: k * v + edges.start, size: edges.fStart * w });
      if (k > 0) out.push({ at: k * v, size: -edges.fEnd * wPrev });
    }
    wPrev = w;
  }
  return out.filter((j) => j.size !== 0);
}

/**
 * Jumps of the slope of that density, f'(x+) - f'(x-), from the claim density g on (start, v) (its values fStart, fEnd
 * and slopes dStart, dEnd at the two ends). One continuous claim among k at the limit (weight w_k as above) steps the
 * slope by dStart w_k at k v + start and by -dEnd w_k at (k + 1) v. Two continuous claims (weight u_k = [z^k] P_N''(a0 +
 * a1 z) / 2) give g * g, whose slope g' * g steps by fStart^2 at 2 start, -2 fStart fEnd at start + v and fEnd^2 at 2 v
 * (each jump of g against the other factor's jumps), shifted by k v; three or more give a continuous slope. For the
 * (a, b, 1) class, differentiating (1 - a s) P'(s) = (a + b) P(s) + c1 gives (1 - a s) P''(s) = (2 a + b) P'(s), so
 * 2 u_k = ((2 a + b) w_k + 2 a a1 u_{k-1}) / (1 - a a0). Empty where a slope is not formed (NaN).
 */
export function layerCompoundKinks(
  N: Node,
  a0: number,
  a1: number,
  v: number,
  byCount: number[],
  edges: { start: number; fStart: number; fEnd: number; dStart?: number; dEnd?: number },
): { at: number; size: number }[] {
  const { start: s, fStart: A, fEnd: B } = edges;
  const DA = edges.dStart ?? NaN;
  const DB = edges.dEnd ?? NaN;
  if (![A, B, DA, DB].every(Number.isFinite)) return [];
  // by position (the same floating-point expressions as the jumps' k v and k v + start, so the kernels pair up)
  return stepsByCount(N, a0, a1, v, byCount, 2, (k, d, limited, add) => {
    const w = d[0];
    const u = d[1] / 2;
    const kv = limited ? k * v : 0;
    add(kv + s, DA * w);
    add(kv + 2 * s, A * A * u);
    if (limited) {
      add((k + 1) * v, -DB * w);
      add((k + 1) * v + s, -2 * A * B * u);
      add((k + 2) * v, B * B * u);
    }
  });
}

/**
 * Jumps of the density's second derivative, f''(x+) - f''(x-), likewise (eStart, eEnd: g'' at the two ends). One continuous
 * claim: eStart w_k at k v + start, -eEnd w_k at (k + 1) v. Two (u_k): (g * g)'' = g'' * g steps by 2 fStart dStart at
 * 2 start, -2 (fStart dEnd + fEnd dStart) at start + v, 2 fEnd dEnd at 2 v (g'' = g''_reg + dStart d_start - dEnd d_v +
 * fStart d'_start - fEnd d'_v against g). Three (r_k = [z^k] P_N'''(a0 + a1 z) / 6): (g^{*3})'' = g' * g' * g steps by
 * fStart^3 at 3 start, -3 fStart^2 fEnd at 2 start + v, 3 fStart fEnd^2 at start + 2 v, -fEnd^3 at 3 v; four or more
 * claims give a continuous second derivative. (1 - a s) P'''(s) = (3 a + b) P''(s) from the recursion once more, so
 * 6 r_k = ((3 a + b) 2 u_k + 6 a a1 r_{k-1}) / (1 - a a0). Empty where a value is not formed (NaN).
 */
export function layerCompoundBends(
  N: Node,
  a0: number,
  a1: number,
  v: number,
  byCount: number[],
  edges: { start: number; fStart: number; fEnd: number; dStart?: number; dEnd?: number; eStart?: number; eEnd?: number },
): { at: number; size: number }[] {
  const { start: s, fStart: A, fEnd: B } = edges;
  const DA = edges.dStart ?? NaN;
  const DB = edges.dEnd ?? NaN;
  const EA = edges.eStart ?? NaN;
  const EB = edges.eEnd ?? NaN;
  if (![A, B, DA, DB, EA, EB].every(Number.isFinite)) return [];
  return stepsByCount(N, a0, a1, v, byCount, 3, (k, d, limited, add) => {
    const w = d[0];
    const u = d[1] / 2;
    const r = d[2] / 6;
    const kv = limited ? k * v : 0;
    add(kv + s, EA * w);
    add(kv + 2 * s, 2 * A * DA * u);
    add(kv + 3 * s, A * A * A * r);
    if (limited) {
      add((k + 1) * v, -EB * w);
      add((k + 1) * v + s, -2 * (A * DB + B * DA) * u);
      add((k + 2) * v, 2 * B * DB * u);
      add((k + 1) * v + 2 * s, -3 * A * A * B * r);
      add((k + 2) * v + s, 3 * A * B * B * r);
      add((k + 3) * v, -B * B * B * r);
    }
  });
}

/**
 * The steps' common recursion: for k = 0..K (K = byCount.length where a limit caps the claims, else 0) the weights
 * d_j = [z^k] P_N^{(j+1)}(a0 + a1 z), j < order (so w_k = d_0, u_k = d_1 / 2, r_k = d_2 / 6), from
 * (1 - a s) P^{(j+1)}(s) = ((j + 1) a + b) P^{(j)}(s) (j >= 1) and (1 - a s) P'(s) = (a + b) P(s) + c1: d_0 = ((a + b) m_k
 * + c1 [k = 0] + a a1 d_0(k-1)) / (1 - a a0), d_j = (((j + 1) a + b) d_{j-1} + a a1 d_j(k-1)) / (1 - a a0). `visit` adds
 * each count's steps by position; the sum at each position, sorted. Empty without the count's (a, b, 1) recursion.
 */
function stepsByCount(
  N: Node,
  a0: number,
  a1: number,
  v: number,
  byCount: number[],
  order: number,
  visit: (k: number, d: Float64Array, limited: boolean, add: (x: number, size: number) => void) => void,
): { at: number; size: number }[] {
  const pan = N.panjer;
  if (!pan) return [];
  const { a, b } = pan;
  const c1 = pan.c1 ?? 0;
  const inv = 1 / (1 - a * a0);
  const limited = Number.isFinite(v) && a1 > 0;
  const K = limited ? byCount.length : 0;
  const at = new Map<number, number>();
  const add = (x: number, size: number) => {
    if (size !== 0 && Number.isFinite(size)) at.set(x, (at.get(x) ?? 0) + size);
  };
  const prev = new Float64Array(order);
  const d = new Float64Array(order);
  for (let k = 0; k <= K; k++) {
    const m = k < byCount.length ? byCount[k] : 0;
    d[0] = ((a + b) * m + (k === 0 ? c1 : 0) + a * a1 * prev[0]) * inv;
    for (let j = 1; j < order; j++) d[j] = (((j + 1) * a + b) * d[j - 1] + a * a1 * prev[j]) * inv;
    visit(k, d, limited, add);
    prev.set(d);
  }
  return [...at].map(([x, size]) => ({ at: x, size })).sort((p, q) => p.at - q.at);
}
