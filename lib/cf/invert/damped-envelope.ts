// Derived envelopes of the damped transform: the per-probe bounds' running maximum and its tails, a compound's
// remainder bounds from its severity's, and the tail past the last probe of a remainder falling like 1 / t.
import { pgfBounds } from "../count-pgf";
import type { RemainderJump } from "../types";
import type { SeverityKernel } from "../severity-kernel";
import type { Envelope } from "./nodes";

const EPS = Number.EPSILON;

/** per probe interval: m_i >= |phi| there and dM_i >= |phi'| past t_i (phiBounds) */
export interface PhiBounds {
  m: Float64Array;
  dM: Float64Array;
}

/**
 * The density-type tail past t_n of a remainder whose bound falls like 1 / t (exponential claims' kernel weights' rounding):
 * psi_c = F + G (CompiledModel.dampedRemainderJump). F's part is int_{t_n} of fast(t_n) (t_n / t)^d = fast(t_n) t_n / (d - 1).
 * G's part is what the inversion of G misses past t_n, g - (g's inversion cut at t_n): for a function of bounded variation
 * V, g = int H(y - u) dg(u) with H the unit step, whose inversion cut at T is 1/2 + Si(T y) / pi, within 1/2 of H at every
 * y (common practice: the Gibbs phenomenon; Si(pi) / pi - 1/2 = 0.089), so at most V / 2 at every point; as a Fourier series
 * the same holds of the periodised g, the sawtooth's partial sums in [0, Si(pi)], whose variation is at most V / (1 -
 * e^{-beta T}) <= 2 V (beta T >= 2 in every plan, ./damped-transform.ts). The envelope's tails are divided by pi, so this
 * part enters as pi V.
 */
export function jumpTail(j: RemainderJump | undefined, beta: number, tn: number): number {
  return j ? splitTail(j.fast(beta, tn) * 1.001, j.decay, j.tv(beta), tn) : Infinity;
}

/** the same from the fast part's size F past t_n (its power `decay`) and the slow part's total variation tv */
export function splitTail(F: number, decay: number, tv: number, tn: number): number {
  if (!(decay > 1)) return Infinity;
  return ((F * tn) / (decay - 1) + Math.PI * tv) * (1 + 8 * EPS);
}

/** per probe: a non-increasing bound on |psi_c| past it (size), and one on |psi_c'| past it (slope) */
export interface DerivedBounds {
  size: Float64Array;
  slope: Float64Array;
  /** int past the last probe of the size bound over t (cdf) and of itself (density), where not the compound remainder's */
  tail?: { cdf: number; pdf: number };
  /**
   * psi_c = F + G split as in jumpTail: fast[i] >= |F| past probe i, F's density-type tail past the last probe (fastTail,
   * before the division by pi), and G's total variation tv. G's inversion cut at any frequency is within tv at every point
   * (jumpTail), so the density's tail past probe i is also (1/pi) int_{t_i} F + tv: G's 1 / t size is not integrated
   */
  split?: { fast: Float64Array; fastTail: number; tv: number };
}

/**
 * The envelope of |psi_c| from derived bounds instead of samples alone (as ./envelope-bound.ts does for undamped laws):
 * on [t_i, t_{i+1}] |psi_c| is at most size(t_i) and, by the mean value theorem, at most
 * max(a_i, a_{i+1}, (a_i + a_{i+1} + slope(t_i) dt) / 2) with a_i the computed |psi_c(t_i)| raised by its error bound;
 * the running maximum from the right then bounds every frequency past each probe. The tails integrate it, and past the
 * last probe the size bound's own power.
 */
export function derivedEnvelope(e: Envelope, mag: Float64Array, nz: Float64Array, b: DerivedBounds): Envelope {
  const { t } = e;
  const n = t.length;
  const env = new Float64Array(n);
  let run = 0;
  for (let i = n - 1; i >= 0; i--) {
    let v = b.size[i];
    if (i + 1 < n) {
      const a0 = (mag[i] + nz[i]) * (1 + 4 * EPS);
      const a1 = (mag[i + 1] + nz[i + 1]) * (1 + 4 * EPS);
      const lip = Math.max(a0, a1, 0.5 * (a0 + a1 + b.slope[i] * (t[i + 1] - t[i]))) * (1 + 4 * EPS);
      if (lip < v) v = lip;
    }
    if (!(v <= Infinity)) v = Infinity;
    if (v > run) run = v;
    env[i] = run;
  }
  const tailPdf = new Float64Array(n);
  const tailCdf = new Float64Array(n);
  // past t_n: size = M^j-type with M(t) <= M(t_n) (t_n / t)^k for the order k >= 1 least at t_n (M(t_n) < 1 there), so
  // size falls at least like t^-2 (j >= 2): int past t_n of size / t <= size(t_n) / 2, of size <= size(t_n) t_n
  const last = b.size[n - 1];
  let sp = b.tail ? b.tail.pdf : last < 1 ? last * t[n - 1] : Infinity;
  let sc = b.tail ? b.tail.cdf : last < 1 ? last / 2 : Infinity;
  tailPdf[n - 1] = sp;
  tailCdf[n - 1] = sc;
  const g = 1 + 2 * n * EPS;
  for (let i = n - 2; i >= 0; i--) {
    sp += env[i] * (t[i + 1] - t[i]);
    sc += env[i] * Math.log(t[i + 1] / t[i]);
    tailPdf[i] = (sp * g) / Math.PI;
    tailCdf[i] = (sc * g) / Math.PI;
  }
  if (b.split && b.split.tv < Infinity && b.split.fastTail < Infinity) {
    // the split's density tail: F's running maximum from the right integrated (an upper sum, as above) plus tv for G
    // (NB(3, 0.2)-exponential(1): the kernel weights' rounding, 16 (J + 1) u r / t, integrated over the probes to t_n
    // ~ 2^54 / scale gave 3e-13 at every cut-off; its variation is 6.4e-14)
    const { fast, fastTail, tv } = b.split;
    let run = 0;
    let sf = fastTail;
    for (let i = n - 1; i >= 0; i--) {
      if (i < n - 1) {
        if (!(fast[i] <= Infinity)) break;
        if (fast[i] > run) run = fast[i];
        sf += run * (t[i + 1] - t[i]);
      }
      const v = ((sf * g) / Math.PI + tv) * (1 + 4 * EPS);
      if (v < tailPdf[i]) tailPdf[i] = v;
    }
  }
  return { ...e, env, tailPdf, tailCdf, derived: true };
}

/**
 * Per probe interval [t_i, t_{i+1}], bounds on the severity's damped transform there: m_i >= |phi| is the least of the
 * derived bound M(t_i) (SeverityKernel.dampedBounds, non-increasing: it holds past t_i) and, by the mean value theorem with
 * |phi'| <= M'(t_i) (the derived slope bound, also non-increasing), (|phi(t_i)| + |phi(t_{i+1})| + M' dt) / 2 with the values'
 * error bound added (a steep count's remainder is set by how far |phi| is below 1, which the samples resolve where M is
 * still 1); the last probe's m is M alone (it holds past it). dM_i = M'(t_i), within the closed-form slope bound. Null where
 * the severity derives no such bounds.
 */
export function phiBounds(sev: SeverityKernel, beta: number, tp: Float64Array, phi: Float64Array): PhiBounds | null {
  const db = sev.dampedBounds;
  if (!db) return null;
  const n = tp.length;
  const m = new Float64Array(n);
  const dM = new Float64Array(n);
  const d = sev.cfAbsError;
  for (let i = 0; i < n; i++) {
    const M = db.abs(beta, tp[i]);
    dM[i] = sev.slope ? Math.min(sev.slope(tp[i]), db.slope(beta, tp[i])) : db.slope(beta, tp[i]);
    let v = M;
    if (i + 1 < n) {
      const a0 = phi[i] * (1 + 4 * EPS) + d;
      const a1 = phi[i + 1] * (1 + 4 * EPS) + d;
      v = Math.min(M, Math.max(a0, a1, 0.5 * (a0 + a1 + dM[i] * (tp[i + 1] - tp[i]))) * (1 + 4 * EPS));
    }
    m[i] = Math.min(1, v);
  }
  return { m, dM };
}

/**
 * Derived bounds for a compound's remainder psi_c = sum_{n >= j} p_n phi^n (the atom at 0 and the one-claim term taken out,
 * j = 2; with the two-claim term out too, j = 3), per probe interval, from phiBounds' m and M': |psi_c| <= sum_{n >= j} p_n m^n
 * <= min(m^j, (m / j) D) and |psi_c'| <= D M' there, D >= sum_{n >= j} n p_n m^{n-1} from the count's own series bound
 * (derivTail) or E N m^{j-1}; the last probe's hold past it. The masses taken out are the count's own within their
 * rounding, which the per-node noise allows for (severityPsi).
 */
/**
 * P_N's upper bounds at m and at m + (1 - m) / 2 for every probe's m, kept with the bounds: a compound with a two-claim term
 * makes both remainders' floors (j = 2 and 3) from one probe, and the count's cumulant function at each is most of their cost
 */
const PGF_AT = new WeakMap<PhiBounds, { count: object; P: Float64Array; P2: Float64Array }>();
function pgfAt(count: NonNullable<SeverityKernel["count"]>, pb: PhiBounds) {
  const hit = PGF_AT.get(pb);
  if (hit && hit.count === count) return hit;
  const pgf = pgfBounds(count, { upper: count.absError, lower: 0 }).upper;
  const n = pb.m.length;
  const P = new Float64Array(n);
  const P2 = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const m = pb.m[i];
    P[i] = pgf(m);
    if (m < 1) P2[i] = pgf(m + 0.5 * (1 - m));
  }
  const v = { count, P, P2 };
  PGF_AT.set(pb, v);
  return v;
}

export function derivedFloor(count: NonNullable<SeverityKernel["count"]>, pb: PhiBounds, pairOut: boolean): DerivedBounds {
  const j = pairOut ? 3 : 2;
  const n = pb.m.length;
  const size = new Float64Array(n);
  const slope = new Float64Array(n);
  // P_N at real s in [0, 1] from the count's cumulant function at log s, within its stated errors (a steep count, Poisson(1000):
  // P_N(0.98) = e^-20, where its table's series bound is still of the order E N)
  const { P: Pm, P2 } = pgfAt(count, pb);
  for (let i = 0; i < n; i++) {
    const m = pb.m[i];
    const P = Pm[i];
    // sum_{n >= j} n p_n m^{n-1} <= P_N'(m) <= (P_N(m') - P_N(m)) / (m' - m) for m < m' <= 1 (P_N' increases on [0, 1])
    const m2 = m + 0.5 * (1 - m);
    const secant = m < 1 ? (P2[i] - Math.max(0, P - 2 * count.absError - 2 * (count.relError + 64 * EPS) * P)) / (m2 - m) : Infinity;
    const D = Math.min(count.derivTail ? count.derivTail(m, j) : Infinity, count.mean * Math.pow(m, j - 1), secant * (1 + 4 * EPS));
    // sum_{n >= j} p_n m^n is at most P_N(m) itself, m^j, and (m / j) D
    size[i] = Math.min(Math.pow(m, j), P, (m / j) * D) * (1 + 8 * EPS);
    slope[i] = D * pb.dM[i] * (1 + 8 * EPS);
  }
  return { size, slope };
}
