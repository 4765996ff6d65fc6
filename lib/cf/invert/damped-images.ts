import type { Atom, CompiledModel } from "../types";
import type { GammaKernel } from "../damped-kernels";
import type { SeverityKernel } from "../severity-kernel";
import { incGamma } from "./incgamma";

const EPS = Number.EPSILON;
/** highest moment order tried in Markov's inequality (the best order for a light tail grows with the distance) */
const MAX_ORDER = 40;
/** stated relative accuracy of incGamma's directly computed P or Q (as in damped-kernels.ts) */
const INC_ACC = 1e-13;

/**
 * A bound B(z), non-increasing in z > 0, on |G(lo + z) - A|: G the damped route's inverted function (continuous part
 * less the gamma kernels, the one-claim and the two-claim terms), A its limit. G - A is minus the mass of those parts
 * beyond lo + z, so |G - A| <= S_c + sum |w_k| S_k + w S_1 + w_2 S_2:
 *   S_c(z) <= P(X - lo > z) <= E[(X - lo)^n] / z^n (Markov), the least over n < min(momentIndex, MAX_ORDER), the raw
 *     moments from the model's cumulants by the recursion m_n = sum_j C(n - 1, j - 1) kappa_j m_{n - j} (Smith 1995,
 *     Int. Stat. Review 63, eq. 5) carried with the cumulants' derived error bounds and the rounding of each step;
 *   S_k: the gamma kernels' tails Q(shape, rate (x - at)) in closed form (incGamma, to its stated accuracy);
 *   S_1: the severity's own sf, w - w F_X from the one-claim term's closed form with its bound;
 *   S_2 <= 2 S_1(z / 2) (X_1 + X_2 > z needs one claim above z / 2).
 * Every part is the tail of a positive measure (or bounds one), so B is non-increasing, and the images
 * sum_{m >= 1} (-1)^m q^m (G(y + m T) - A) that the damped cdf keeps after the closed-form shift are at most
 * q / (1 - q) B(y + T) at y = x - lo: a per-point bound in place of the uniform q / (1 - q) second / T^2.
 * Null when the model states no cumulants with bounds (the uniform bound stands).
 */
export function imageTail(
  model: CompiledModel,
  atoms: Atom[],
  lo: number,
  kernels: readonly GammaKernel[],
  severity: SeverityKernel | null,
  pair: SeverityKernel["pair"] | null,
): ((z: number) => number) | null {
  if (!model.cumulantErrors) return null;
  const Mc = Math.max(1 - atoms.reduce((s, a) => s + a.p, 0), 0);
  // the moments are computed on first use: the quantile search makes many loose solutions it evaluates at one point
  let mom: { c: number; logU: Float64Array } | null | undefined;
  const continuous = (z: number) => {
    if (mom === undefined) mom = momentBounds(model, lo);
    if (!mom) return Mc;
    const lr = Math.log(z / mom.c);
    let best = Infinity;
    // each candidate with the rounding of its logarithms (log U_n, n log(z / c)) added: exp then errs by a few ulps
    for (let n = 1; n < mom.logU.length; n++) best = Math.min(best, mom.logU[n] - n * lr + 4 * EPS * (Math.abs(mom.logU[n]) + n * Math.abs(lr) + n + 1));
    return Math.min(Mc, Math.exp(best) * (1 + 4 * EPS));
  };
  const sevTail = (x: number) => {
    if (!severity) return 0;
    const v = severity.at(x);
    return Math.max(severity.w - v.F + v.err + 4 * EPS * severity.w, 0);
  };
  return (z: number) => {
    if (!(z > 0)) return Infinity;
    const x = lo + z;
    let b = continuous(z);
    for (const k of kernels) {
      const y = x - k.at;
      if (!(y > 0)) {
        b += Math.abs(k.w);
        continue;
      }
      const u = k.rate * y;
      const g = incGamma(k.shape, u);
      // the stated accuracy is relative to the quantity computed directly (P below u = shape + 1, Q = 1 - P rounding
      // once more; Q above)
      const acc = INC_ACC + 4 * EPS * u;
      b += Math.abs(k.w) * (g.Q + (u < k.shape + 1 ? acc * g.P + 4 * EPS : acc * g.Q));
    }
    if (severity) b += sevTail(x);
    if (pair && pair.w > 0) {
      b += severity && severity.w > 0 ? (2 * pair.w * sevTail(lo + z / 2)) / severity.w : (pair.w * pair.moments[1]) / (z * z);
    }
    return b * (1 + 8 * EPS);
  };
}

/**
 * Upper bounds on E[((X - lo) / c)^n], n = 1 .. N, as logarithms (index 0 unused), c a scale that keeps them in range;
 * null when the cumulants or their bounds are missing. The recursion runs on values v_n with an absolute bound e_n:
 * each product C kappa_j v_{n - j} errs by |kappa_j| e + delta_j (|v| + e), plus (n + 4) 2 eps of sum |C kappa_j v| for
 * the products and the sum. An order whose upper bound is not a positive finite number ends the list.
 */
export function momentBounds(model: CompiledModel, lo: number): { c: number; logU: Float64Array } | null {
  const N = Number.isFinite(model.momentIndex) ? Math.min(MAX_ORDER, Math.ceil(model.momentIndex) - 1) : MAX_ORDER;
  if (N < 1) return null;
  const k = model.cumulants(N);
  const ke = model.cumulantErrors!(N);
  const k1 = k[0];
  const k2 = N >= 2 ? k[1] : 0;
  if (k1 === null || !Number.isFinite(k1)) return null;
  const c = Math.max(Math.abs(k1 - lo) + Math.sqrt(Math.max(k2 ?? 0, 0)), 1e-300);
  const kt: number[] = [0];
  const dt: number[] = [0];
  for (let j = 1; j <= N; j++) {
    const kj = k[j - 1];
    const ej = ke[j - 1];
    if (kj === null || ej === null || !Number.isFinite(kj) || !Number.isFinite(ej)) break;
    const cj = Math.pow(c, j);
    const raw = j === 1 ? kj - lo : kj;
    const v = raw / cj;
    if (!Number.isFinite(v) || !Number.isFinite(cj)) break;
    // kappa_1 - lo rounds once; pow and the division within (j + 4) eps
    const e = (ej + (j === 1 ? EPS * (Math.abs(kj) + Math.abs(lo)) : 0)) / cj + (j + 4) * 2 * EPS * Math.abs(v);
    kt.push(v);
    dt.push(e);
  }
  const M = kt.length - 1;
  if (M < 1) return null;
  const v = new Float64Array(M + 1);
  const e = new Float64Array(M + 1);
  const logU: number[] = [0];
  v[0] = 1;
  // binomial coefficients C(n - 1, j - 1), exact in doubles up to n = 40 (below 2^53)
  let row = [1];
  for (let n = 1; n <= M; n++) {
    if (n > 1) {
      const next = [1];
      for (let i = 1; i < n - 1; i++) next.push(row[i - 1] + row[i]);
      next.push(1);
      row = next;
    }
    let s = 0;
    let sAbs = 0;
    let err = 0;
    for (let j = 1; j <= n; j++) {
      const C = row[j - 1];
      const t = C * kt[j] * v[n - j];
      s += t;
      sAbs += Math.abs(t);
      err += C * (Math.abs(kt[j]) * e[n - j] + dt[j] * (Math.abs(v[n - j]) + e[n - j]));
    }
    err += (n + 4) * 2 * EPS * sAbs;
    v[n] = s;
    e[n] = err * (1 + 4 * n * EPS);
    const U = s + e[n];
    if (!(U > 0) || !Number.isFinite(U)) break;
    logU.push(Math.log(U));
  }
  return logU.length > 1 ? { c, logU: Float64Array.from(logU) } : null;
}
