import type { Node, NodeKind } from "./node";
import { cumulantsToRaw, rawToCumulants } from "./node";
import { nearestZero, sortedAnchor, unwrapFrom } from "./complex";
import { mixKinds, repeatKind, scaleKind, shiftKind, sumKinds, MAX_ATOMS, mergeAtoms } from "./kinds";
import { commonStep, convolveTables, onLattice, panjer, powerTable, restep } from "./lattice";
import type { Atom, LatticeTable } from "./types";
import { point } from "./families/discrete";

const collectNotes = (cs: Node[]) => [...new Set(cs.flatMap((c) => c.notes))];

/** Width measure that adds correctly for finite variance (root sum of squares) and conservatively otherwise. */
function combineScales(cs: Node[]): number {
  if (cs.every((c) => c.momentIndex > 2)) return Math.sqrt(cs.reduce((s, c) => s + c.scale * c.scale, 0));
  return cs.reduce((s, c) => s + c.scale, 0);
}

function addCumulants(lists: (number | null)[][], n: number): (number | null)[] {
  const out: (number | null)[] = new Array(n).fill(0);
  for (const l of lists) for (let k = 0; k < n; k++) out[k] = out[k] === null || l[k] === null ? null : (out[k] as number) + (l[k] as number);
  return out;
}

/** Independent sum: log phi = sum of log phi_j (each on its continuous branch). */
export function sumNode(cs: Node[]): Node {
  if (cs.length === 1) return cs[0];
  let kind: NodeKind = cs[0].kind;
  for (let j = 1; j < cs.length; j++) kind = sumKinds(kind, cs[j].kind);
  const allCount = cs.every((c) => c.countCgf);
  const node: Node = {
    kind,
    momentIndex: Math.min(...cs.map((c) => c.momentIndex)),
    tails: { left: Math.min(...cs.map((c) => c.tails.left)), right: Math.min(...cs.map((c) => c.tails.right)) },
    nodes: 1 + cs.reduce((s, c) => s + c.nodes, 0),
    notes: collectNotes(cs),
    location: cs.reduce((s, c) => s + c.location, 0),
    scale: combineScales(cs),
    support: [cs.reduce((s, c) => s + c.support[0], 0), cs.reduce((s, c) => s + c.support[1], 0)],
    logCf(t, re, im) {
      cs[0].logCf(t, re, im);
      const r2 = new Float64Array(t.length);
      const i2 = new Float64Array(t.length);
      for (let j = 1; j < cs.length; j++) {
        cs[j].logCf(t, r2, i2);
        for (let k = 0; k < t.length; k++) {
          re[k] += r2[k];
          im[k] += i2[k];
        }
      }
    },
    cumulants: (n) => addCumulants(cs.map((c) => c.cumulants(n)), n),
  };
  if (kind.type === "lattice" && cs.every((c) => c.table)) {
    node.table = (maxLength) => {
      const tabs = cs.map((c) => c.table!(maxLength));
      if (tabs.some((x) => !x)) return null;
      return convolveTables(tabs as LatticeTable[], maxLength);
    };
  }
  if (allCount) {
    node.countCgf = (wr, wi, re, im) => {
      cs[0].countCgf!(wr, wi, re, im);
      const r2 = new Float64Array(wr.length);
      const i2 = new Float64Array(wr.length);
      for (let j = 1; j < cs.length; j++) {
        cs[j].countCgf!(wr, wi, r2, i2);
        for (let k = 0; k < wr.length; k++) {
          re[k] += r2[k];
          im[k] += i2[k];
        }
      }
    };
    node.p0 = cs.reduce((s, c) => s * (c.p0 ?? 0), 1);
  }
  return node;
}

/** Law of aX: phi(t) = phi_X(a t); for a < 0, log phi_X(a t) = conj log phi_X(|a| t) keeps the branch continuous. */
export function scaleNode(a: number, c: Node): Node {
  const aa = Math.abs(a);
  const node: Node = {
    kind: scaleKind(c.kind, a),
    momentIndex: c.momentIndex,
    tails: a > 0 ? c.tails : { left: c.tails.right, right: c.tails.left },
    nodes: 1 + c.nodes,
    notes: c.notes,
    location: a * c.location,
    scale: aa * c.scale,
    support: a > 0 ? [a * c.support[0], a * c.support[1]] : [a * c.support[1], a * c.support[0]],
    logCf(t, re, im) {
      const s = new Float64Array(t.length);
      for (let k = 0; k < t.length; k++) s[k] = aa * t[k];
      c.logCf(s, re, im);
      if (a < 0) for (let k = 0; k < t.length; k++) im[k] = -im[k];
    },
    cumulants: (n) => c.cumulants(n).map((v, k) => (v === null ? null : v * a ** (k + 1))),
  };
  if (c.table && c.kind.type === "lattice") {
    node.table = (maxLength) => {
      const tab = c.table!(maxLength);
      if (!tab) return null;
      if (a > 0) return { origin: a * tab.origin, step: a * tab.step, p: tab.p, tailMass: tab.tailMass };
      if (tab.tailMass > 0) return null; // reversing a truncated table would put the cut at the lower end
      const p = tab.p.slice().reverse();
      return { origin: a * (tab.origin + (tab.p.length - 1) * tab.step), step: aa * tab.step, p, tailMass: 0 };
    };
  }
  if (c.countCgf && Number.isInteger(a) && a > 0) {
    node.countCgf = (wr, wi, re, im) => {
      const sr = wr.map((v) => a * v);
      const si = wi.map((v) => a * v);
      c.countCgf!(sr, si, re, im);
    };
    node.p0 = c.p0;
  }
  return node;
}

/** Law of X + b: log phi = log phi_X + i b t. */
export function shiftNode(b: number, c: Node): Node {
  const node: Node = {
    kind: shiftKind(c.kind, b),
    momentIndex: c.momentIndex,
    tails: c.tails,
    nodes: 1 + c.nodes,
    notes: c.notes,
    location: c.location + b,
    scale: c.scale,
    support: [c.support[0] + b, c.support[1] + b],
    logCf(t, re, im) {
      c.logCf(t, re, im);
      for (let k = 0; k < t.length; k++) im[k] += b * t[k];
    },
    cumulants: (n) => c.cumulants(n).map((v, k) => (k === 0 && v !== null ? v + b : v)),
  };
  if (c.table && c.kind.type === "lattice") {
    node.table = (maxLength) => {
      const tab = c.table!(maxLength);
      return tab ? { ...tab, origin: tab.origin + b } : null;
    };
  }
  if (c.countCgf && Number.isInteger(b) && b >= 0) {
    node.countCgf = (wr, wi, re, im) => {
      c.countCgf!(wr, wi, re, im);
      for (let k = 0; k < wr.length; k++) {
        re[k] += b * wr[k];
        im[k] += b * wi[k];
      }
    };
    node.p0 = b === 0 ? c.p0 : 0;
  }
  return node;
}

/** Sum of n independent copies: log phi = n log phi_X (the continuous branch makes this the right power). */
export function repeatNode(n: number, c: Node): Node {
  const ex = 1 / Math.min(2, Math.max(c.momentIndex, 1));
  const node: Node = {
    kind: repeatKind(c.kind, n),
    momentIndex: c.momentIndex,
    tails: c.tails,
    nodes: 1 + c.nodes,
    notes: c.notes,
    location: n * c.location,
    scale: n ** ex * c.scale,
    support: [n * c.support[0], n * c.support[1]],
    logCf(t, re, im) {
      c.logCf(t, re, im);
      for (let k = 0; k < t.length; k++) {
        re[k] *= n;
        im[k] *= n;
      }
    },
    cumulants: (m) => c.cumulants(m).map((v) => (v === null ? null : n * v)),
  };
  if (c.table && c.kind.type === "lattice") {
    node.table = (maxLength) => {
      const tab = c.table!(maxLength);
      return tab ? powerTable(tab, n, maxLength) : null;
    };
  }
  if (c.countCgf) {
    node.countCgf = (wr, wi, re, im) => {
      c.countCgf!(wr, wi, re, im);
      for (let k = 0; k < wr.length; k++) {
        re[k] *= n;
        im[k] *= n;
      }
    };
    node.p0 = (c.p0 ?? 0) ** n;
  }
  return node;
}

/**
 * log sum_j w_j exp(L_j) over arrays, computed about a common centre (subtracting i mu t before summing), then the
 * imaginary part is unwrapped along the index from `anchor` (when >= 0).
 */
function logMix(ws: number[], parts: { re: Float64Array; im: Float64Array }[], lin: Float64Array | null, re: Float64Array, im: Float64Array, anchor: number) {
  const n = re.length;
  for (let k = 0; k < n; k++) {
    let sr = 0;
    let si = 0;
    const off = lin ? lin[k] : 0;
    for (let j = 0; j < ws.length; j++) {
      const m = ws[j] * Math.exp(parts[j].re[k]);
      const ph = parts[j].im[k] - off;
      sr += m * Math.cos(ph);
      si += m * Math.sin(ph);
    }
    re[k] = Math.log(Math.hypot(sr, si));
    im[k] = Math.atan2(si, sr);
  }
  if (anchor >= 0) unwrapFrom(im, anchor);
  if (lin) for (let k = 0; k < n; k++) im[k] += lin[k];
}

/** Mixture: phi = sum_j w_j phi_j; raw moments mix linearly. */
export function mixNode(ws: number[], cs: Node[]): Node {
  if (cs.length === 1) return cs[0];
  const kind = mixKinds(ws, cs.map((c) => c.kind));
  const mu = cs.reduce((s, c, j) => s + ws[j] * c.location, 0);
  const node: Node = {
    kind,
    momentIndex: Math.min(...cs.map((c) => c.momentIndex)),
    tails: { left: Math.min(...cs.map((c) => c.tails.left)), right: Math.min(...cs.map((c) => c.tails.right)) },
    nodes: 1 + cs.reduce((s, c) => s + c.nodes, 0),
    notes: collectNotes(cs),
    location: mu,
    scale: Math.sqrt(cs.reduce((s, c, j) => s + ws[j] * (c.scale * c.scale + (c.location - mu) ** 2), 0)),
    support: [Math.min(...cs.map((c) => c.support[0])), Math.max(...cs.map((c) => c.support[1]))],
    logCf(t, re, im) {
      const parts = cs.map((c) => {
        const r = new Float64Array(t.length);
        const i = new Float64Array(t.length);
        c.logCf(t, r, i);
        return { re: r, im: i };
      });
      const lin = t.map((x) => mu * x);
      logMix(ws, parts, lin, re, im, sortedAnchor(t));
    },
    cumulants(n) {
      const raws = cs.map((c) => cumulantsToRaw(c.cumulants(n)));
      const mixed: (number | null)[] = [];
      for (let k = 0; k < n; k++) {
        let s: number | null = 0;
        for (let j = 0; j < cs.length; j++) s = s === null || raws[j][k] === null ? null : s + ws[j] * (raws[j][k] as number);
        mixed.push(s);
      }
      return rawToCumulants(mixed);
    },
  };
  if (kind.type === "lattice" && cs.every((c) => c.table)) {
    node.table = (maxLength) => {
      const tabs = cs.map((c) => c.table!(maxLength));
      if (tabs.some((x) => !x)) return null;
      const g = kind.step || 1;
      const st = (tabs as LatticeTable[]).map((x) => restep(x, g));
      const lo = Math.min(...st.map((x) => x.origin));
      const hi = Math.max(...st.map((x) => x.origin + (x.p.length - 1) * g));
      const len = Math.round((hi - lo) / g) + 1;
      const out = new Float64Array(Math.min(len, maxLength));
      let tail = 0;
      st.forEach((x, j) => {
        const off = Math.round((x.origin - lo) / g);
        for (let k = 0; k < x.p.length; k++) {
          const v = ws[j] * x.p[k];
          if (off + k < out.length) out[off + k] += v;
          else tail += v;
        }
        tail += ws[j] * x.tailMass;
      });
      return { origin: lo, step: g, p: out, tailMass: tail };
    };
  }
  if (cs.every((c) => c.countCgf)) {
    node.countCgf = (wr, wi, re, im) => {
      const parts = cs.map((c) => {
        const r = new Float64Array(wr.length);
        const i = new Float64Array(wr.length);
        c.countCgf!(wr, wi, r, i);
        return { re: r, im: i };
      });
      logMix(ws, parts, null, re, im, nearestZero(wr, wi));
    };
    node.p0 = cs.reduce((s, c, j) => s + ws[j] * (c.p0 ?? 0), 0);
  }
  return node;
}

/**
 * Compound S = X_1 + ... + X_N: log phi_S(t) = log P_N(phi_X(t)) = K_N(log phi_X(t)), K_N the count's cumulant function
 * at complex argument (Klugman, Panjer & Willmot, Loss Models, sec. 9.3). Cumulants by composing the two cumulant
 * series, K_S(u) = K_N(K_X(u)).
 */
export function compoundNode(N: Node, X: Node): Node {
  const P0 = N.p0 ?? 0;
  let kind: NodeKind;
  const notes = collectNotes([N, X]);
  if (X.kind.type === "continuous") kind = P0 > 0 ? { type: "mixed", atoms: [{ x: 0, p: P0 }], atomsComplete: true } : { type: "continuous" };
  else if (X.kind.type === "lattice") {
    const { origin, step } = X.kind;
    const g = step === 0 ? Math.abs(origin) : commonStep(step, origin);
    if (g === 0) kind = { type: "lattice", origin: 0, step: 0, atoms: [{ x: 0, p: 1 }] };
    else kind = g === null ? { type: "discrete", atoms: null } : { type: "lattice", origin: 0, step: g, atoms: null };
  } else if (X.kind.type === "discrete") kind = { type: "discrete", atoms: null };
  else {
    kind = { type: "mixed", atoms: P0 > 0 ? [{ x: 0, p: P0 }] : [], atomsComplete: false };
    notes.push("compound of a severity with atoms and a continuous part: only the atom at 0 is listed");
  }
  const nMean = N.cumulants(1)[0] ?? N.location;
  const node: Node = {
    kind,
    momentIndex: Math.min(N.momentIndex, X.momentIndex),
    tails: X.tails,
    nodes: 1 + N.nodes + X.nodes,
    notes,
    location: nMean * X.location,
    scale: Math.sqrt(Math.max(nMean, 0) * X.scale * X.scale + N.scale * N.scale * X.location * X.location) || X.scale,
    support: compoundSupport(N.support, X.support),
    logCf(t, re, im) {
      const a = new Float64Array(t.length);
      const b = new Float64Array(t.length);
      X.logCf(t, a, b);
      N.countCgf!(a, b, re, im);
    },
    cumulants(n) {
      const kx = X.cumulants(n);
      const kn = N.cumulants(n);
      let valid = n;
      for (let k = 0; k < n; k++) if (kx[k] === null || kn[k] === null) {
        valid = k;
        break;
      }
      const out: (number | null)[] = new Array(n).fill(null);
      if (valid === 0) return out;
      // a_k = kappa_k(X)/k!, b_j = kappa_j(N)/j!; c_m = sum_j b_j [u^m] A(u)^j; kappa_m(S) = m! c_m
      const A = new Float64Array(valid + 1);
      let f = 1;
      for (let k = 1; k <= valid; k++) {
        f *= k;
        A[k] = (kx[k - 1] as number) / f;
      }
      const c = new Float64Array(valid + 1);
      let pow = new Float64Array(valid + 1);
      pow[0] = 1;
      let fj = 1;
      for (let j = 1; j <= valid; j++) {
        const next = new Float64Array(valid + 1);
        for (let i = 0; i <= valid; i++) {
          if (pow[i] === 0) continue;
          for (let k = 1; i + k <= valid; k++) next[i + k] += pow[i] * A[k];
        }
        pow = next;
        fj *= j;
        const bj = (kn[j - 1] as number) / fj;
        for (let m = j; m <= valid; m++) c[m] += bj * pow[m];
      }
      let fm = 1;
      for (let m = 1; m <= valid; m++) {
        fm *= m;
        out[m - 1] = c[m] * fm;
      }
      return out;
    },
  };
  if (kind.type === "lattice" && X.table) {
    node.table = (maxLength) => compoundTable(N, X, kind as { step: number }, maxLength, node);
  }
  if (X.countCgf) {
    node.countCgf = (wr, wi, re, im) => {
      const a = new Float64Array(wr.length);
      const b = new Float64Array(wr.length);
      X.countCgf!(wr, wi, a, b);
      N.countCgf!(a, b, re, im);
    };
    node.p0 = pgfAt(N, X.p0 ?? 0);
  }
  return node;
}

function compoundSupport(n: readonly [number, number], x: readonly [number, number]): [number, number] {
  const mul = (a: number, b: number) => (a === 0 || b === 0 ? 0 : a * b);
  const c = [mul(n[0], x[0]), mul(n[0], x[1]), mul(n[1], x[0]), mul(n[1], x[1])];
  if (n[0] === 0) c.push(0);
  return [Math.min(...c), Math.max(...c)];
}

/** P_N(z) for real z in [0, 1]. */
export function pgfAt(N: Node, z: number): number {
  if (z === 0) return N.p0 ?? 0;
  const re = new Float64Array(1);
  const im = new Float64Array(1);
  N.countCgf!(Float64Array.of(Math.log(z)), Float64Array.of(0), re, im);
  return Math.exp(re[0]);
}

function compoundTable(N: Node, X: Node, kind: { step: number }, maxLength: number, S: Node): LatticeTable | null {
  const g = kind.step;
  if (g === 0) return { origin: 0, step: 1, p: Float64Array.of(1), tailMass: 0 };
  // length from the compound's cumulants: mean + 40 sd in steps, capped
  const k = S.cumulants(2);
  const mean = k[0] ?? 0;
  const sd = Math.sqrt(Math.max(k[1] ?? 0, 0));
  let len = Math.ceil((mean + 40 * sd) / g) + 64;
  len = Math.min(maxLength, Math.max(len, 1));
  // g_k depends on the severity only up to index k, so a severity table truncated beyond len is exact here
  const xt = X.table!(len + 1);
  if (!xt) return null;
  const r = restep(xt, g);
  const m = Math.round(r.origin / g);
  if (m < 0 || !onLattice(r.origin, g)) return null;
  // a severity table cut short by its own tail (xt.tailMass) only lowers the computed masses; 1 - sum reports it
  const sev = new Float64Array(Math.min(m + r.p.length, len + 1));
  const cut = Math.max(0, sev.length - m);
  if (cut > 0) sev.set(r.p.subarray(0, cut), m);
  if (N.kind.type === "lattice" && N.kind.step === 0) {
    // a fixed count k: the k-fold power
    const kk = N.kind.origin;
    if (kk === 0) return { origin: 0, step: g, p: Float64Array.of(1), tailMass: 0 };
    const pw = powerTable({ origin: 0, step: g, p: sev, tailMass: 0 }, kk, len);
    let s = 0;
    for (let i = 0; i < pw.p.length; i++) s += pw.p[i];
    return { origin: 0, step: g, p: pw.p, tailMass: Math.max(0, 1 - s) };
  }
  if (N.panjer) {
    if (len * sev.length <= 4e8) {
      const p = panjer({ a: N.panjer.a, b: N.panjer.b, pgf: (z) => pgfAt(N, z) }, sev, len);
      if (p) {
        let s = 0;
        for (let i = 0; i < p.length; i++) s += p[i];
        return { origin: 0, step: g, p, tailMass: Math.max(0, 1 - s) };
      }
    }
  }
  // count with a short table: sum_k P(N=k) X^{*k}
  const nt = N.table?.(4097);
  if (nt && nt.tailMass === 0 && nt.p.length <= 4096 && nt.origin >= 0 && nt.step === 1 && Number.isInteger(nt.origin)) {
    const out = new Float64Array(len);
    const sevTab: LatticeTable = { origin: 0, step: g, p: sev, tailMass: 0 };
    let cur: LatticeTable = { origin: 0, step: g, p: Float64Array.of(1), tailMass: 0 };
    const kmax = nt.origin + nt.p.length - 1;
    for (let kk = 0; kk <= kmax; kk++) {
      const w = kk >= nt.origin ? nt.p[kk - nt.origin] : 0;
      if (w > 0) for (let i = 0; i < cur.p.length && i < len; i++) out[i] += w * cur.p[i];
      if (kk < kmax) cur = convolveTables([cur, sevTab], len);
    }
    let s = 0;
    for (let i = 0; i < len; i++) s += out[i];
    return { origin: 0, step: g, p: out, tailMass: Math.max(0, 1 - s) };
  }
  return null;
}

/** Lattice law on origin + k step: phi(t) = sum_k p_k e^{i t (origin + k step)} (direct sum, centred at the mean). */
export function latticeNode(origin: number, step: number, pIn: ArrayLike<number>, note?: string): Node {
  let f = 0;
  let l = pIn.length - 1;
  while (f < l && !(pIn[f] > 0)) f++;
  while (l > f && !(pIn[l] > 0)) l--;
  const o = origin + f * step;
  if (f === l) return point(o);
  const p = Float64Array.from({ length: l - f + 1 }, (_, k) => pIn[f + k]);
  let total = 0;
  for (let k = 0; k < p.length; k++) total += p[k];
  for (let k = 0; k < p.length; k++) p[k] /= total;
  const xs = Float64Array.from(p, (_, k) => o + k * step);
  const base = atomsNode(xs, p);
  const atoms: Atom[] | null = p.length <= MAX_ATOMS ? mergeAtoms(Array.from(p, (v, k) => ({ x: xs[k], p: v }))) : null;
  const isCount = Number.isInteger(o) && o >= 0 && Number.isInteger(step);
  const node: Node = {
    ...base,
    notes: note ? [note] : [],
    kind: { type: "lattice", origin: o, step, atoms },
    table: (maxLength) => {
      if (p.length <= maxLength) return { origin: o, step, p: p.slice(), tailMass: 0 };
      let tail = 0;
      for (let k = maxLength; k < p.length; k++) tail += p[k];
      return { origin: o, step, p: p.slice(0, maxLength), tailMass: tail };
    },
  };
  if (isCount) {
    node.countCgf = (wr, wi, re, im) => {
      // log(z^o sum_k p_k (z^step)^k), Horner in z^step, z = e^w (|z| <= 1)
      for (let k = 0; k < wr.length; k++) {
        const e = Math.exp(step * wr[k]);
        const zr = e * Math.cos(step * wi[k]);
        const zi = e * Math.sin(step * wi[k]);
        let sr = 0;
        let si = 0;
        for (let j = p.length - 1; j >= 0; j--) {
          const nr = sr * zr - si * zi + p[j];
          si = sr * zi + si * zr;
          sr = nr;
        }
        re[k] = Math.log(Math.hypot(sr, si)) + o * wr[k];
        im[k] = Math.atan2(si, sr) + o * wi[k];
      }
      unwrapFrom(im, nearestZero(wr, wi));
    };
    node.p0 = o === 0 ? p[0] : 0;
  }
  return node;
}

/** Finite discrete law: phi(t) = sum_j p_j e^{i t x_j}, summed about the mean with re-anchored rotations. */
export function atomsNode(xs: Float64Array, ps: Float64Array): Node {
  const n = xs.length;
  let mean = 0;
  for (let j = 0; j < n; j++) mean += ps[j] * xs[j];
  const cm = (r: number) => {
    let s = 0;
    for (let j = 0; j < n; j++) s += ps[j] * (xs[j] - mean) ** r;
    return s;
  };
  let lo = Infinity;
  let hi = -Infinity;
  for (let j = 0; j < n; j++) {
    if (xs[j] < lo) lo = xs[j];
    if (xs[j] > hi) hi = xs[j];
  }
  const sd = Math.sqrt(cm(2));
  // equally spaced xs allow the rotation recurrence; otherwise cos/sin per term
  const equal = n > 2 && xs.every((x, j) => j === 0 || Math.abs(x - xs[0] - j * (xs[1] - xs[0])) <= 1e-12 * Math.max(Math.abs(x), 1));
  const atoms = n <= MAX_ATOMS ? mergeAtoms(Array.from(xs, (x, j) => ({ x, p: ps[j] }))) : null;
  return {
    kind: { type: "discrete", atoms },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [],
    location: mean,
    scale: sd || 1,
    support: [lo, hi],
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        const x = t[k];
        let sr = 0;
        let si = 0;
        if (equal) {
          const h = xs[1] - xs[0];
          const cr = Math.cos(x * h);
          const ci = Math.sin(x * h);
          let zr = 0;
          let zi = 0;
          for (let j = 0; j < n; j++) {
            if ((j & 31) === 0) {
              const a = x * (xs[0] + j * h - mean);
              zr = Math.cos(a);
              zi = Math.sin(a);
            }
            sr += ps[j] * zr;
            si += ps[j] * zi;
            const nr = zr * cr - zi * ci;
            zi = zr * ci + zi * cr;
            zr = nr;
          }
        } else {
          for (let j = 0; j < n; j++) {
            const a = x * (xs[j] - mean);
            sr += ps[j] * Math.cos(a);
            si += ps[j] * Math.sin(a);
          }
        }
        re[k] = Math.log(Math.hypot(sr, si));
        im[k] = Math.atan2(si, sr);
      }
      const anchor = sortedAnchor(t);
      if (anchor >= 0) unwrapFrom(im, anchor);
      for (let k = 0; k < t.length; k++) im[k] += mean * t[k];
    },
    cumulants(m) {
      const central: number[] = [];
      for (let r = 1; r <= m; r++) central.push(r === 1 ? 0 : cm(r));
      const k = rawToCumulants(central);
      if (m > 0) k[0] = mean;
      return k;
    },
  };
}

/** Empirical law of data: a lattice law when the values sit on a common lattice of moderate length, else atoms. */
export function sampleNode(values: number[], maxLattice: number): Node {
  const v = Float64Array.from(values).sort();
  const xs: number[] = [];
  const cnt: number[] = [];
  for (let j = 0; j < v.length; j++) {
    if (xs.length > 0 && v[j] === xs[xs.length - 1]) cnt[cnt.length - 1]++;
    else {
      xs.push(v[j]);
      cnt.push(1);
    }
  }
  const n = v.length;
  if (xs.length === 1) return point(xs[0]);
  let g: number | null = 0;
  for (let j = 1; j < xs.length && g !== null; j++) g = commonStep(g, xs[j] - xs[0]);
  if (g !== null && g > 0) {
    const len = Math.round((xs[xs.length - 1] - xs[0]) / g) + 1;
    if (len <= maxLattice && len <= 64 * xs.length + 1024) {
      const p = new Float64Array(len);
      for (let j = 0; j < xs.length; j++) p[Math.round((xs[j] - xs[0]) / g)] += cnt[j] / n;
      return latticeNode(xs[0], g, p);
    }
  }
  return atomsNode(Float64Array.from(xs), Float64Array.from(cnt, (c) => c / n));
}
