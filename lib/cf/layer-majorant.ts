import type { Atom } from "./types";
import type { DirectLaw } from "./families/dist";
import { normalCdf, normalDist } from "./families/dist";
import { majorant, type LogMajorant } from "./majorant";
import { powerMajorant } from "./power-majorant";

const EPS = Number.EPSILON;

/**
 * The point where a unimodal claim density is largest (modes from Klugman, Panjer & Willmot, Loss Models, app. A; JKB
 * vol. 1 chs. 13-21 and vol. 2 chs. 25-26), or the support's lower end where the density falls from there; null where
 * the density is not unimodal (beta with both shapes below 1) or is largest at a power singularity (returned as such:
 * the caller refuses it, f there is infinite).
 */
export function claimMode(family: string, p: Record<string, number>): number | null {
  const beta = (al: number, be: number, a: number, b: number) =>
    al >= 1 && be >= 1 ? (al + be > 2 ? a + ((b - a) * (al - 1)) / (al + be - 2) : a) : al < 1 && be >= 1 ? a : be < 1 && al >= 1 ? b : null;
  switch (family) {
    case "normal":
      return p.mu;
    case "uniform":
      return p.a;
    case "exponential":
    case "lomax":
      return 0;
    case "gamma":
      return Math.max(p.shape - 1, 0) / p.rate;
    case "chi_squared":
      return Math.max(p.k - 2, 0);
    case "lognormal":
      return Math.exp(p.mu - p.sigma * p.sigma);
    case "pareto":
      return p.xm;
    case "weibull":
      return p.shape > 1 ? p.scale * Math.pow((p.shape - 1) / p.shape, 1 / p.shape) : 0;
    case "generalized_pareto": {
      const mu = p.mu ?? 0;
      return p.xi >= -1 ? mu : mu - p.sigma / p.xi;
    }
    case "burr":
    case "loglogistic": {
      const a = family === "burr" ? p.alpha : 1;
      return p.gamma > 1 ? p.theta * Math.pow((p.gamma - 1) / (a * p.gamma + 1), 1 / p.gamma) : 0;
    }
    case "inverse_gaussian":
      return p.mu * (Math.sqrt(1 + (9 * p.mu * p.mu) / (4 * p.lambda * p.lambda)) - (3 * p.mu) / (2 * p.lambda));
    case "inverse_gamma":
      return p.theta / (p.alpha + 1);
    case "beta":
      return beta(p.alpha, p.beta, p.a ?? 0, p.b ?? 1);
    case "pert": {
      const lam = p.lambda ?? 4;
      return beta(1 + (lam * (p.m - p.a)) / (p.b - p.a), 1 + (lam * (p.b - p.m)) / (p.b - p.a), p.a, p.b);
    }
    case "triangular":
      return p.c;
    default:
      return null;
  }
}

/** |phi - sum of the atoms' terms| <= M(t): a majorant of the law's continuous part alone, with the atoms it leaves out */
export interface ContinuousMajorant {
  atoms: Atom[];
  maj: LogMajorant;
}

/**
 * Per-claim layer Y = c min((X - d)_+, l) of a claim with a unimodal density f (mode x*): Y's continuous part is
 * y -> f(d + y / c) / c on (c u0, c l), u0 = (lo - d)_+, with mass w = F(d + l) - F(max(d, lo)). f restricted to
 * [p, q] = [max(d, lo), d + l] (jumps to 0 at both ends included) has total variation 2 f(clamp(x*, p, q)) (it rises to
 * that point and falls after it), so by the bounded-variation bound (common practice; Katznelson, An Introduction to
 * Harmonic Analysis, ch. I) |int_p^q f(x) e^{i t c (x - d)} dx| <= 2 f(clamp(x*, p, q)) / (c t), and <= w: tail power 1.
 * With a limit the derivative about the continuous part's middle y_c is at most w c (l - u0) / 2 (|y - y_c| on it).
 * `atoms` are the layer's two atoms (at 0 and c l), as the node lists them. f at the point: the closed-form pdf, taken
 * within 1e-10 of itself (a few exp, log and pow, or lgamma and special functions far below that).
 */
export function layerContinuousMajorant(dist: DirectLaw, mode: number, d: number, l: number, c: number, atoms: Atom[]): ContinuousMajorant | undefined {
  const p = Math.max(d, dist.lo);
  const q = d + l;
  if (!(q > p) || !(c > 0)) return undefined;
  const at = Math.min(Math.max(mode, p), q);
  // at an end of the support the pdf may be given as its outer (zero) limit: the largest of it and its values a few
  // units of rounding to either side (f moves by a relative |f'/f| 4u |x| there, far inside the 1e-10 allowed)
  const dx = 4 * EPS * Math.abs(at) + 1e-300;
  const fmax = Math.max(dist.pdf(at), dist.pdf(at + dx), dist.pdf(at - dx));
  if (!Number.isFinite(fmax)) return undefined;
  const w = Math.min(1, (l < Infinity ? dist.cdf(q) - dist.cdf(p) : dist.sf(p)) * (1 + 4 * EPS) + 2 * dist.accuracy);
  const J = (2 * fmax * (1 + 1e-10)) / c;
  const value = (t: number) => Math.min(w, J / Math.abs(t));
  const u0 = p - d;
  const slope =
    l < Infinity
      ? {
          center: (c * (u0 + l)) / 2,
          at: (t: Float64Array, out: Float64Array) => out.fill(((w * c * (l - u0)) / 2) * (1 + 4 * EPS), 0, t.length),
        }
      : undefined;
  const maj = majorant(
    (t, out) => {
      for (let i = 0; i < t.length; i++) out[i] = Math.log(value(t[i]));
    },
    (t) => (J / t < w ? { log: Math.log(J / t), q: 1 } : { log: Math.log(w), q: 0 }),
    slope,
  );
  return { atoms, maj };
}

/**
 * Truncated normal N(mu, sigma^2) on [a, b] (JKB vol. 1 ch. 13 sec. 10.1): f = phi(z) / (sigma Z), z = (x - mu) / sigma,
 * unimodal with its largest value at clamp(mu, a, b), so TV(f) (jumps at finite ends included) = 2 f(clamp(mu, a, b));
 * and with jumps f(a), f(b) at the ends, f' = -z f / sigma, |f'| <= phi(1) / (sigma^2 Z) (at z = +-1), and f' rises,
 * falls and rises again, TV(f' on (a, b)) <= 4 max |f'|: |phi| <= (f(a) + f(b)) / t + 6 phi(1) / (sigma^2 Z t^2) (the
 * bounded-variation bounds of power-majorant.ts). Z = Phi(beta) - Phi(alpha) (upper-tail form past the mean) is taken
 * less twice the normal cdf's stated accuracy on each term.
 */
export function truncatedNormalMajorant(mu: number, sigma: number, lower?: number, upper?: number): LogMajorant | undefined {
  const a = lower ?? -Infinity;
  const b = upper ?? Infinity;
  const al = (a - mu) / sigma;
  const be = (b - mu) / sigma;
  const [t1, t2] = al > 0 ? [normalCdf(-al), normalCdf(-be)] : [normalCdf(be), normalCdf(al)];
  const Z = (t1 - t2) * (1 - 4 * EPS) - 2 * normalDist(0, 1).accuracy * (t1 + t2);
  if (!(Z > 0) || !(sigma > 0)) return undefined;
  const phi = (z: number) => (Number.isFinite(z) ? Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI) : 0);
  const m = 1 + 64 * EPS;
  const f = (z: number) => (phi(z) / (sigma * Z)) * m;
  const zm = Math.min(Math.max(0, al), be);
  return powerMajorant([[1], [0, 2 * f(zm)], [0, f(al) + f(be), (6 * phi(1) * m) / (sigma * sigma * Z)]]);
}
