// The lattice table of a compound of a lattice count and a lattice severity: Panjer's recursion with its running error
// bound where the count is in the (a, b, 0) or (a, b, 1) class with a >= 0, else powers and the count's short table
// (a severity with points below 0: ./compound-table-signed.ts).
import type { Node } from "./node";
import { onLattice, powerTable, restep, convolveTables } from "./lattice";
import { panjerRun, type PanjerInputErrors } from "./panjer";
import { pointErrOf, roundOf, type TableRound } from "./table-rounding";
import type { LatticeTable } from "./types";
import { checkDeadline } from "./deadline";
import { MAX_LATTICE } from "./limits";
import { countSlope } from "./compound-fft-round";
import { signedCompoundTable } from "./compound-table-signed";
import { compoundTailBound, restBound } from "./compound-tail";

const U = Number.EPSILON / 2;

/** P_N(z) for real z in [0, 1]. */
export function pgfAt(N: Node, z: number): number {
  if (z === 0) return N.p0 ?? 0;
  const re = new Float64Array(1);
  const im = new Float64Array(1);
  N.countCgf!(Float64Array.of(Math.log(z)), Float64Array.of(0), re, im);
  return Math.exp(re[0]);
}

export function compoundTable(N: Node, X: Node, kind: { step: number }, maxLength: number, S: Node): LatticeTable | null {
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
  // (a severity table whose dropped mass may lie below it, a reversed one's: the tables below place it past their end)
  if (!xt || (xt.tailMass > 0 && (xt.tailBelow || !Number.isFinite(X.support[0])))) return null;
  const r = restep(xt, g);
  const m = Math.round(r.origin / g);
  // (the severity's first entry sits at index m of sev; below it zeros)
  const sevShift = m;
  if (!onLattice(r.origin, g)) return null;
  if (m < 0) {
    // a severity with points below 0: the count's short table and whole powers (./compound-table-signed.ts)
    const full = X.table!(maxLength);
    const nt = N.table?.(4097);
    if (!full || !nt || nt.p.length > 4096) return null;
    const rf = restep(full, g);
    return onLattice(rf.origin, g) ? signedCompoundTable(nt, rf, Math.round(rf.origin / g), g, maxLength) : null;
  }
  // a severity table cut short by its own tail (xt.tailMass) only lowers the computed masses; 1 - sum reports it
  const sev = new Float64Array(Math.min(m + r.p.length, len + 1));
  const cut = Math.max(0, sev.length - m);
  if (cut > 0) sev.set(r.p.subarray(0, cut), m);
  const sevRound = roundOf(xt) ?? undefined;
  if (N.kind.type === "lattice" && N.kind.step === 0) {
    // a fixed count k: the k-fold power
    const kk = N.kind.origin;
    if (kk === 0) return { origin: 0, step: g, p: Float64Array.of(1), tailMass: 0 };
    // (the severity's rounding bound, where known, is carried through the powers)
    const pw = powerTable({ origin: 0, step: g, p: sev, tailMass: 0, ...(sevRound ? { round: sevRound } : {}) }, kk, len);
    let s = 0;
    for (let i = 0; i < pw.p.length; i++) s += pw.p[i];
    return { origin: 0, step: g, p: pw.p, tailMass: Math.max(0, 1 - s), ...(pw.round ? { round: pw.round } : {}) };
  }
  // binomial-type counts (a < 0) make the recursion unstable (Panjer & Wang 1993, On the stability of recursive
  // formulas): rounding grows along the table (a Bernoulli count gave a table summing to 1.001 with mass beyond
  // the largest possible total); their finite count table takes the direct sum below instead
  if (N.panjer && N.panjer.a >= 0) {
    if (len * sev.length <= 4e8) {
      const count = { a: N.panjer.a, b: N.panjer.b, c1: N.panjer.c1, pgf: (z: number) => pgfAt(N, z) };
      const run = panjerRun(count, sev, len, panjerInputs(N, xt, sev, m, count.pgf(sev[0])));
      if (run) {
        const p = run.g;
        let s = 0;
        for (let i = 0; i < p.length; i++) s += p[i];
        const shift = run.err ? severityShift(N, xt, sev) : null;
        const round = run.err && shift ? roundOfErrors(run.err) : null;
        // (each entry within its running bound plus the severity's shift, which round sums up; kept per entry too. The
        // recursion gives every entry below len: the dropped mass lies past the table, tailFrom)
        const pointErr = round && shift && run.err ? Float64Array.from(run.err, (e) => (e + shift.pmf) * (1 + Number.EPSILON)) : null;
        // the dropped mass: from a whole severity, the smaller of the Chernoff bound (./compound-tail.ts) and 1 - sum widened
        // by its rounding and the entries' bound (restBound): 1 - sum alone is mostly the entries' rounding once the table
        // reaches far into the tail; else 1 - sum as computed
        const chern = xt.tailMass === 0 && m + r.p.length <= sev.length ? severityTail(N, r, roundOf(xt), m, sev, p.length) : Infinity;
        const tail = Number.isFinite(chern) ? Math.min(chern, round && shift ? restBound(p, round.l1 + shift.l1) : Infinity) : Math.max(0, 1 - s);
        return { origin: 0, step: g, p, tailMass: tail, tailFrom: p.length, ...(round && shift ? { round: { pmf: round.pmf + shift.pmf, l1: round.l1 + shift.l1 } } : {}), ...(pointErr ? { pointErr } : {}) };
      }
      // P(S = 0) underflows (large expected counts): run the recursion for the count divided into 2^m equal
      // independent parts and take the 2^m-fold power (Loss Models, aggregate loss chapter; recalled from memory)
      if (N.divide) {
        for (let m = 2; m <= 2 ** 30; m *= 2) {
          const part = N.divide(m);
          const g0 = part.pgf(sev[0]);
          if (g0 > 1e-200) {
            const run = panjerRun(part, sev, len, partInputs(N, part, xt, sev, sevShift, g0));
            if (!run) break;
            // (the severity's own errors only through pointRel or none here: the part's slope is not the count's)
            const sh = run.err ? severityShift(N, xt, sev) : null;
            const q: LatticeTable = { origin: 0, step: g, p: run.g, tailMass: 0, ...(run.err && sh && sh.pmf === 0 && sh.l1 === 0 ? { round: roundOfErrors(run.err) } : {}) };
            const pw = powerTable(q, m, len, true);
            let s = 0;
            for (let i = 0; i < pw.p.length; i++) s += pw.p[i];
            return { origin: 0, step: g, p: pw.p, tailMass: Math.max(0, 1 - s), ...(pw.round ? { round: pw.round } : {}) };
          }
        }
      }
    }
  }
  // count with a short table (its own dropped tail below 1e-16, carried into tailMass): sum_k P(N=k) X^{*k}
  const nt = N.table?.(4097);
  if (nt && nt.tailMass <= 1e-16 && nt.p.length <= 4096 && nt.origin >= 0 && nt.step === 1 && Number.isInteger(nt.origin)) {
    const out = new Float64Array(len);
    const sevTab: LatticeTable = { origin: 0, step: g, p: sev, tailMass: 0, ...(sevRound ? { round: sevRound } : {}) };
    // the rounding: each cur's bound (carried by convolveTables), weighted, and the weights' own (nt's l1 bound: each
    // cur's entries and mass at most 1 + its l1), each entry a sum of at most kmax + 1 products (gamma_{kmax+2})
    const nr = roundOf(nt);
    let rp = 0;
    let rl = 0;
    let known = !!nr && !!sevRound;
    let cur: LatticeTable = { origin: 0, step: g, p: Float64Array.of(1), tailMass: 0 };
    const kmax = nt.origin + nt.p.length - 1;
    for (let kk = 0; kk <= kmax; kk++) {
      checkDeadline("compound-table");
      const w = kk >= nt.origin ? nt.p[kk - nt.origin] : 0;
      if (w > 0) {
        for (let i = 0; i < cur.p.length && i < len; i++) out[i] += w * cur.p[i];
        const cr = roundOf(cur);
        if (cr && nr) {
          rp += w * cr.pmf + nr.l1 * cr.pmf;
          rl += w * cr.l1 + nr.l1 * cr.l1;
        } else known = false;
      }
      if (kk < kmax) cur = convolveTables([cur, sevTab], len);
    }
    let s = 0;
    let mx = 0;
    for (let i = 0; i < len; i++) {
      s += out[i];
      if (out[i] > mx) mx = out[i];
    }
    const G = ((kmax + 2) * U) / (1 - (kmax + 2) * U);
    const round = known ? { pmf: (rp + nr!.l1 + G * mx) * (1 + 8 * U), l1: (rl + nr!.l1 + G * s * (1 + len * 2 * U)) * (1 + 8 * U) } : undefined;
    return { origin: 0, step: g, p: out, tailMass: Math.max(0, 1 - s), ...(round ? { round } : {}) };
  }
  return null;
}

/**
 * The stored inputs' errors for panjerRun: the count's parameter bounds (Node.panjer.err), the severity table's (its
 * entries within pointRel relative, or exact), and g_0 = pgfAt(N, f_0) against P_N(f_0) (pgfBound); null where one is
 * not known.
 */
function panjerInputs(N: Node, xt: LatticeTable, sev: Float64Array, shift: number, g0: number): PanjerInputErrors | null {
  const e = N.panjer?.err;
  if (!e) return null;
  const fRel = severityRel(xt, sev, shift);
  if (!fRel) return null;
  const nt = N.table?.(MAX_LATTICE);
  const g0Abs = nt ? pgfBound(nt, sev[0], fRel[0], g0) : Infinity;
  if (!Number.isFinite(g0Abs)) return null;
  return { aRel: e.a, bRel: e.b, c1Abs: e.c1, g0Abs, fRel };
}

/**
 * The inputs' errors for a Poisson count divided into m parts (N.divide): a = 0 and b = lambda / m exact (m a power of
 * 2), g_0 = e^{b (f_0 - 1)}: f_0 - 1 one rounding (none from 1/2 up, Sterbenz), the product one, exp an ulp, and f_0's
 * own error times b f_0. null for other counts.
 */
function partInputs(N: Node, part: { a: number; b: number }, xt: LatticeTable, sev: Float64Array, shift: number, g0: number): PanjerInputErrors | null {
  const pan = N.panjer;
  if (!pan || pan.a !== 0 || pan.c1 !== undefined || part.a !== 0 || !N.panjer?.err) return null;
  const fRel = severityRel(xt, sev, shift);
  if (!fRel) return null;
  const z = sev[0];
  const arg = Math.abs(part.b * (z - 1));
  const g0Abs = g0 * (arg * (z >= 0.5 ? 1 : 2) * U + part.b * z * fRel[0] + 2 * U) * 1.01;
  return { aRel: 0, bRel: 0, c1Abs: 0, g0Abs, fRel };
}

/**
 * Each severity entry's relative error bound (relative to the stored value), non-decreasing: from the table's pointRel
 * (itself non-decreasing, relative to the exact value), 0 for an exact table; null where neither is known.
 */
function severityRel(xt: LatticeTable, sev: Float64Array, shift: number): Float64Array | null {
  // sev[shift + q ms] = xt.p[q] (restepped onto the compound's step, ms >= 1), zeros elsewhere (exact): q <= j - shift
  const fRel = new Float64Array(sev.length);
  const rel = xt.pointRel;
  if (!rel) {
    // (a table with only absolute bounds: the recursion is bounded against the stored entries, severityShift adds theirs)
    if (!roundOf(xt)) return null;
  } else {
    for (let j = 0; j < sev.length; j++) {
      // pointRel is non-decreasing in the table's index, which is at most j - shift; relative to the exact value, so
      // r / (1 - r) relative to the stored one
      const r = rel(Math.max(0, j - shift));
      if (!(r < 1e-3)) return null;
      fRel[j] = (r / (1 - r)) * (1 + U);
    }
  }
  return fRel;
}

/**
 * The compound's move from a severity table known only to absolute bounds (no pointRel): the recursion is bounded
 * against the stored entries, and the compound map is Lipschitz, ||f^{*n} - f'^{*n}|| <= n ||f - f'|| max(||f||_1,
 * ||f'||_1)^{n-1} in the sup norm and in l1 (Young's inequality), so the table moves by at most P_N'(max mass) times
 * the severity's bounds: E N where both masses are at most 1 (countSlope: E N + 2 delta E N^2 past it). 0 for a table
 * with pointRel (its entries' errors are in the recursion's own bound); null without a count slope.
 */
function severityShift(N: Node, xt: LatticeTable, sev: Float64Array): TableRound | null {
  if (xt.pointRel) return { pmf: 0, l1: 0 };
  const r = roundOf(xt);
  if (!r) return null;
  if (r.pmf === 0 && r.l1 === 0) return r;
  let mass = 0;
  for (let j = 0; j < sev.length; j++) mass += sev[j];
  const slope = countSlope(N, Math.max(0, mass * (1 + sev.length * Number.EPSILON) + r.l1 - 1));
  if (!Number.isFinite(slope)) return null;
  return { pmf: slope * r.pmf * (1 + 4 * U), l1: slope * r.l1 * (1 + 4 * U) };
}

/**
 * A bound on |g0 - P_N(z*)|, z* the exact value of the stored z (within zRel z), from the count's own table (each p_n within
 * pointRel(n) of the exact pmf): S = sum_n p_n z^n over the table, z^n by repeated products (n - 1 roundings) and z's error
 * n zRel, each term one more rounding, the sum of non-negative terms within gamma_L (Higham, Accuracy and Stability of
 * Numerical Algorithms, 2nd ed., sec. 4.2); past the table at most z^L (1 + zRel)^L times twice tailMass (the table's
 * dropped mass, summed on until its terms fell below 1e-21 of it with the ratio below 1). Then |g0 - S| is added.
 */
export function pgfBound(t: LatticeTable, z: number, zRel: number, g0: number): number {
  const rel = t.pointRel;
  if (!rel || t.origin !== 0 || t.step !== 1 || !(z >= 0 && z <= 1)) return Infinity;
  const L = t.p.length;
  let S = 0;
  let e = 0;
  let pw = 1;
  let n = 0;
  for (; n < L; n++) {
    if (n > 0) pw *= z;
    const term = t.p[n] * pw;
    S += term;
    const r = rel(n);
    e += term * ((r / (1 - r)) * 1.01 + (n * (U + zRel) + 2 * U) * 1.01);
    if (pw === 0) break;
  }
  // (the terms summed: n + 1 of them, or all L)
  const m = Math.min(n + 1, L);
  const tail = pw * z * (1 + zRel) ** (L + 1) * 2 * t.tailMass;
  const g = (m * U) / (1 - m * U);
  e = (e + g * S * (1 + g) + tail) * (1 + 4 * U) + m * 2 ** -1074;
  return (Math.abs(g0 - S) + e) * (1 + 2 * U);
}

/** a table's rounding bound from each entry's: the largest, and their sum (within gamma_n of itself) */
function roundOfErrors(err: Float64Array): TableRound {
  let pmf = 0;
  let l1 = 0;
  for (let k = 0; k < err.length; k++) {
    if (err[k] > pmf) pmf = err[k];
    l1 += err[k];
  }
  return { pmf, l1: l1 * (1 + err.length * Number.EPSILON) };
}

/** the Chernoff bound on P(S >= L g) with the severity's per-entry bounds (or its whole-table one per entry) aligned to sev */
function severityTail(N: Node, r: LatticeTable, whole: TableRound | null, m: number, sev: Float64Array, L: number): number {
  const pe = pointErrOf(r);
  if (!pe && !whole) return Infinity;
  const err = new Float64Array(sev.length);
  for (let j = 0; j < r.p.length && m + j < err.length; j++) err[m + j] = pe ? pe[j] : whole!.pmf;
  return compoundTailBound(N, sev, err, L);
}
