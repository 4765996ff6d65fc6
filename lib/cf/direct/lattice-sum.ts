import { twoProdErr, twoSumErr } from "../moment-error";
import type { LatticeTable } from "../types";
import { directPoint, type DirectLaw, type DirectPoint } from "./types";

/** longest lattice table a sum X + K is answered from term by term (each point costs one evaluation of X per entry) */
export const MAX_LATTICE_SUM_TERMS = 128;
/** points past a table's end bounded one by one (by the recursion's bound on p_k there) before the rest's mass */
const BEYOND_TERMS = 64;

const U = Number.EPSILON / 2;
const gamma = (n: number) => (n * U) / (1 - n * U);
/** a b, with 0 times an unbounded size 0 (an entry of mass 0, or one known exactly, adds nothing) */
const mul = (a: number, b: number) => (a === 0 ? 0 : a * b);

/** the neighbouring double of y toward +inf (dir > 0) or -inf */
const bits = new Float64Array(1);
const ints = new BigInt64Array(bits.buffer);
function nextToward(y: number, dir: number): number {
  if (y === 0) return dir > 0 ? Number.MIN_VALUE : -Number.MIN_VALUE;
  bits[0] = y;
  ints[0] += y > 0 === dir > 0 ? 1n : -1n;
  return bits[0];
}

/**
 * A table with per-table bounds (round) cut back past its last entry above 1e-30 of its largest: the entries left out,
 * each within round.pmf of itself, join the dropped mass (tailMass, lying from the cut on where the table's own dropped
 * mass does: tailFrom). Tables with per-entry bounds (a recursion's, which end where their terms do) pass unchanged.
 */
export function trimTable(t: LatticeTable): LatticeTable {
  const r = t.round;
  if (t.pointRel || !r) return t;
  const pe = t.pointErr && t.pointErr.length === t.p.length ? t.pointErr : null;
  let pMax = 0;
  for (let k = 0; k < t.p.length; k++) pMax = Math.max(pMax, t.p[k]);
  let n = t.p.length;
  while (n > 1 && t.p[n - 1] <= 1e-30 * pMax) n--;
  if (n === t.p.length) return t;
  let cut = 0;
  for (let k = n; k < t.p.length; k++) cut += Math.max(t.p[k], 0) + (pe ? pe[k] : r.pmf);
  const from = t.tailMass > 0 ? Math.min(t.tailFrom ?? 0, n) : n;
  return { ...t, p: t.p.slice(0, n), tailMass: (t.tailMass + cut) * (1 + (t.p.length + 2) * Number.EPSILON), tailFrom: from, ...(pe ? { pointErr: pe.slice(0, n) } : {}) };
}

/**
 * X + K for X continuous with a direct law and K an independent lattice law tabulated on s_k = origin + k step (every
 * s_k exact in doubles) with a bound on each entry: f(x) = sum_k p_k f_X(x - s_k), F and S likewise (the law of the sum
 * conditioned on K; Feller, An Introduction to Probability Theory, vol. II, sec. V.4). Per point:
 *  - x - s_k as computed is y^ with its rounding d found exactly (Knuth's TwoSum); where d != 0 the exact y lies between
 *    y^ and its neighbouring double y', where F_X and S_X are monotone, and so is f_X where X's mode (within a few ulps
 *    of its value, exact where a parameter) is not strictly inside: each value at y is within |g^(y') - g^(y^)| plus
 *    the bound at y' of g^(y^); an infinite f_X at an exact y (a power singularity at X's support end) makes f infinite;
 *  - the products p_k g_k and their sum by Dot2 (Ogita, Rump & Oishi, Accurate sum and dot product, SIAM J. Sci.
 *    Comput. 26, 2005, alg. 5.3): within u |sum| + gamma_n^2 sum |p_k g_k|;
 *  - the inputs: sum_k p_k e_k (X's bounds) plus sum_k dp_k (g_k + e_k), the table's entry bounds dp_k (a recursion's
 *    pointRel(k) p_k, or the table's pointErr, else min(pmf sum_k, l1 max_k) of the rounded table's two bounds);
 *  - the table's dropped mass m (on the points from t.tailFrom on: a recursion's own end, inside the range for a
 *    convolution of cut tables, else anywhere; K's support starting at the table): S within m, F within m F_X(x - s_j0),
 *    f within the sum of bound(p_j) f_X(x - s_j) over those points right of X's mode (at most 64 past the table; p_j
 *    within m, or past a recursion's end its `beyond`) plus m f_X at the first point left of the mode (f_X rises there),
 *    or m f_X(mode) where the mode is exact (DirectLaw.modeExact: f_X's largest value), the smaller; else unbounded.
 * Null where the route does not apply (X without a mode, or with atoms or singular points; a table without per-entry
 * bounds, with a discretisation error, too long, or on a lattice whose points round).
 */
export function latticeSumDirect(X: DirectLaw, t: LatticeTable, lowerEnd: number): DirectLaw | null {
  const m = X.mode;
  if (m === undefined || !Number.isFinite(m) || X.atoms || X.singular) return null;
  const n = t.p.length;
  if (n < 1 || n > MAX_LATTICE_SUM_TERMS || t.cdfError !== undefined || !(t.step > 0) || !(t.tailMass >= 0 && t.tailMass < 1)) return null;
  // the dropped mass lies above the table only where K has no mass below its first entry
  if (t.tailMass > 0 && !(lowerEnd >= t.origin)) return null;
  const rel = t.pointRel;
  const beyond = rel ? t.beyond : undefined;
  // the first index where the dropped mass may lie: a recursion's own end; else where the table says, or anywhere
  const j0 = Math.max(0, Math.min(n, t.tailFrom ?? (rel && t.beyond ? n : 0)));
  // per-entry bounds: a recursion's relative ones, or absolute ones where the table has them (a Panjer run's); else
  // the whole table's
  const pe = rel ? null : (t.pointErr && t.pointErr.length >= n ? t.pointErr : null);
  const perEntry = !!rel || !!pe;
  const round = perEntry ? null : t.round;
  if (!perEntry && !round) return null;
  const s = new Float64Array(n + 1);
  for (let k = 0; k <= n; k++) {
    const a = k * t.step;
    const ea = twoProdErr(k, t.step, a);
    const v = t.origin + a;
    if (ea !== 0 || twoSumErr(t.origin, a, v) !== 0) return null;
    s[k] = v;
  }
  const p = t.p;
  const dp = new Float64Array(n);
  let mean = 0;
  let mass = 0;
  for (let k = 0; k < n; k++) {
    if (!(p[k] >= 0)) return null;
    if (rel) dp[k] = rel(k) * p[k] * (1 + 2 * U);
    else if (pe) dp[k] = pe[k];
    mean += p[k] * s[k];
    mass += p[k];
  }
  mean /= mass;
  let v = 0;
  for (let k = 0; k < n; k++) v += p[k] * (s[k] - mean) ** 2;
  const sd = Math.sqrt(v / mass);
  // X's mode is known within a few of its ulps (exactly where it is a parameter): a rounding interval that meets that
  // box is not known to be monotone. An exact mode gives f_X's largest value, f_X(m) with its bound
  const w = X.modeExact ? 0 : 4 * Number.EPSILON * Math.abs(m);
  let supF = Infinity;
  if (X.modeExact) {
    const o = directPoint();
    X.at(m, o);
    if (Number.isFinite(o.pdf) && Number.isFinite(o.pdfErr)) supF = (o.pdf + o.pdfErr) * (1 + 2 * U);
  }
  const tail = t.tailMass;
  const g2 = gamma(n + 1) ** 2;
  const a = directPoint();
  const b = directPoint();
  const lo = X.support[0] + s[0];
  const hi = tail > 0 ? Infinity : X.support[1] + s[n - 1];
  const sl = X.stopLoss;
  // E[(X + K - c)^+] = sum_k p_k E[(X - (c - s_k))^+] (and the lower one likewise): each within X's bound, its argument's
  // rounding |d| (the transform is 1-Lipschitz in c), the entry's bound times the value; the sum of n non-negative
  // terms within gamma_n. Only for a whole table (no dropped mass, whose far points' excess has no bound here).
  const stopLoss =
    sl && tail === 0
      ? (c: number, side: 1 | -1): { v: number; e: number } | null => {
          let v = 0;
          let e = 0;
          for (let k = 0; k < n; k++) {
            const y = c - s[k];
            const d = twoSumErr(c, -s[k], y);
            const r = sl(y, side);
            if (!r || !Number.isFinite(r.v) || !Number.isFinite(r.e)) return null;
            v += p[k] * r.v;
            const dk = perEntry ? dp[k] : round!.pmf;
            e += p[k] * (r.e + Math.abs(d)) + dk * (Math.abs(r.v) + r.e + Math.abs(d));
          }
          return { v, e: (e + gamma(2 * n + 2) * Math.abs(v)) * (1 + gamma(2 * n + 4)) };
        }
      : undefined;
  return {
    method: X.method,
    ...(stopLoss ? { stopLoss } : { shortfallByInversion: true }),
    support: [lo, hi],
    center: X.center + mean,
    spread: X.spread + sd,
    notes: [...X.notes, `the sum with a lattice law of ${n} points: each value summed over the lattice points (no CF inversion)`],
    at(x: number, out: DirectPoint) {
      // Dot2 accumulators (value, compensation) for f, F, S; the bounds' sums
      let pf = 0, cf = 0, pF = 0, cF = 0, pS = 0, cS = 0;
      let absF = 0, absC = 0, absS = 0;
      let slack = 0;
      let ef = 0, eF = 0, eS = 0;
      let sumG = 0, maxG = 0, sumGc = 0, maxGc = 0, sumGs = 0, maxGs = 0;
      let pdfInf = false;
      let pdfUnbounded = false;
      for (let k = 0; k < n; k++) {
        const pk = p[k];
        const y = x - s[k];
        const d = twoSumErr(x, -s[k], y);
        X.at(y, a);
        let fe = a.pdfErr;
        let Fe = a.cdfErr;
        let Se = a.sfErr;
        if (d !== 0 && Number.isFinite(d)) {
          // F_X and S_X are monotone everywhere: their values at y lie between those at y^ and y'; f_X is where the
          // interval stays off X's mode
          const y2 = nextToward(y, d);
          X.at(y2, b);
          Fe = Math.max(Fe, Math.abs(b.cdf - a.cdf) + b.cdfErr);
          Se = Math.max(Se, Math.abs(b.sf - a.sf) + b.sfErr);
          if (w > 0 && Math.max(y, y2) > m - w && Math.min(y, y2) < m + w) fe = Infinity;
          else fe = Math.max(fe, Math.abs(b.pdf - a.pdf) + b.pdfErr);
        } else if (!Number.isFinite(d)) fe = Fe = Se = Infinity;
        if (!Number.isFinite(a.pdf) || !Number.isFinite(fe)) {
          // an infinite density at an exact y (X's power singularity met by this lattice point, with mass there for
          // certain) makes the sum's density infinite, its exact limit; else an unbounded error
          if (pk > 0 && a.pdf === Infinity && d === 0 && (perEntry ? pk > dp[k] : pk > round!.pmf)) pdfInf = true;
          else if (pk > 0 || dp[k] > 0 || (round && round.pmf > 0)) pdfUnbounded = true;
          fe = 0;
          a.pdf = 0;
        }
        // the products and sums, error-free where TwoProduct applies (else u of the product into the slack)
        const hf = pk * a.pdf;
        const hF = pk * a.cdf;
        const hS = pk * a.sf;
        const rf = twoProdErr(pk, a.pdf, hf);
        const rF = twoProdErr(pk, a.cdf, hF);
        const rS = twoProdErr(pk, a.sf, hS);
        if (rf === null) slack += U * hf + Number.MIN_VALUE;
        if (rF === null) slack += U * hF + Number.MIN_VALUE;
        if (rS === null) slack += U * hS + Number.MIN_VALUE;
        let t1 = pf + hf;
        cf += twoSumErr(pf, hf, t1) + (rf ?? 0);
        pf = t1;
        t1 = pF + hF;
        cF += twoSumErr(pF, hF, t1) + (rF ?? 0);
        pF = t1;
        t1 = pS + hS;
        cS += twoSumErr(pS, hS, t1) + (rS ?? 0);
        pS = t1;
        absF += hf;
        absC += hF;
        absS += hS;
        ef += mul(pk, fe);
        eF += mul(pk, Fe);
        eS += mul(pk, Se);
        const gf = a.pdf + fe;
        const gF = Math.min(a.cdf + Fe, 1);
        const gS = Math.min(a.sf + Se, 1);
        if (perEntry) {
          ef += mul(dp[k], gf);
          eF += mul(dp[k], gF);
          eS += mul(dp[k], gS);
        } else {
          sumG += gf;
          maxG = Math.max(maxG, gf);
          sumGc += gF;
          maxGc = Math.max(maxGc, gF);
          sumGs += gS;
          maxGs = Math.max(maxGs, gS);
        }
      }
      if (round) {
        ef += Math.min(mul(round.pmf, sumG), mul(round.l1, maxG));
        eF += Math.min(mul(round.pmf, sumGc), mul(round.l1, maxGc));
        eS += Math.min(mul(round.pmf, sumGs), mul(round.l1, maxGs));
      }
      // the mass past the table: every value of F and S within it, f within it times f_X's largest value there
      // the dropped mass lies at s_k >= s_j0, where F_X(x - s_k) <= F_X(x - s_j0) (at the double above, the rounding's
      // side): the cdf's part of it is at most the mass times that
      let tF = tail;
      if (tail > 0) {
        X.at(nextToward(x - s[j0], 1), b);
        tF = tail * Math.min(1, b.cdf + b.cdfErr);
      }
      let tf = 0;
      if (tail > 0) {
        // the points past the table right of X's mode (at most BEYOND_TERMS of them) each by its own bound on p_k (a
        // recursion's `beyond`, else the whole mass); from the first left of the mode on, f_X rises with y: the whole
        // mass times f_X there
        let sum = 0;
        let done = false;
        for (let j = j0; j <= Math.max(j0, n) + BEYOND_TERMS; j++) {
          const aj = j * t.step;
          const sj = t.origin + aj;
          if (twoProdErr(j, t.step, aj) !== 0 || twoSumErr(t.origin, aj, sj) !== 0) break;
          const y = x - sj;
          // the exact x - s_j lies between y's two neighbours
          const yLo = nextToward(y, -1);
          const yUp = nextToward(y, 1);
          if (yUp < m - w) {
            X.at(yUp, b);
            sum += tail * (b.pdf + b.pdfErr);
            done = true;
            break;
          }
          if (yUp > m - w && yLo < m + w) break;
          // right of the mode f_X falls: its largest value on [yLo, yUp] is at yLo; p_j is at most the whole mass
          X.at(yLo, a);
          sum += (beyond && j >= n ? Math.min(beyond(j), tail) : tail) * (a.pdf + a.pdfErr);
        }
        // (past the points bounded one by one, or in place of them: the whole mass times f_X's largest value)
        tf = Math.min(done ? sum : Infinity, mul(tail, supF));
      }
      const vf = pf + cf;
      const vF = pF + cF;
      const vS = pS + cS;
      const up = 1 + gamma(4 * n + 8);
      out.pdf = Math.max(vf, 0);
      out.cdf = Math.min(Math.max(vF, 0), 1);
      out.sf = Math.min(Math.max(vS, 0), 1);
      out.pdfErr = (U * Math.abs(vf) + g2 * absF + ef + tf + slack) * up;
      out.cdfErr = Math.min((U * Math.abs(vF) + g2 * absC + eF + tF + slack) * up, 1);
      out.sfErr = Math.min((U * Math.abs(vS) + g2 * absS + eS + tail + slack) * up, 1);
      if (!(out.pdfErr <= Number.MAX_VALUE) || pdfUnbounded) out.pdfErr = Infinity;
      if (pdfInf) {
        out.pdf = Infinity;
        out.pdfErr = pdfUnbounded ? Infinity : 0;
      }
    },
  };
}
