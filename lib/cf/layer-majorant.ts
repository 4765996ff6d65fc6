import type { Atom } from "./types";
import type { DirectLaw } from "./families/dist";
import { normalCdfBounded } from "./families/normal-bounded";
import { directPoint, type DirectLaw as DirectEval } from "./direct/types";
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
 * `atoms` are the layer's two atoms (at 0 and c l), as the node lists them. f at the point and the mass w from the claim's
 * direct law (../direct/types.ts), each raised by its derived bound; at an end of the support the pdf may be given as its
 * outer (zero) limit, so the largest of its values there and a few units of rounding to either side is taken.
 */
export function layerContinuousMajorant(dist: DirectLaw, direct: DirectEval, mode: number, d: number, l: number, c: number, atoms: Atom[]): ContinuousMajorant | undefined {
  const p = Math.max(d, dist.lo);
  const q = d + l;
  if (!(q > p) || !(c > 0)) return undefined;
  const at = Math.min(Math.max(mode, p), q);
  const pt = directPoint();
  const up = (x: number) => {
    direct.at(x, pt);
    return pt.pdf + pt.pdfErr;
  };
  const dx = 4 * EPS * Math.abs(at) + 1e-300;
  const fmax = Math.max(up(at), up(at + dx), up(at - dx)) * (1 + 4 * EPS);
  if (!Number.isFinite(fmax)) return undefined;
  // w = F(q) - F(p), or S(p) without a limit: each value raised (lowered) by its bound
  direct.at(p, pt);
  const Fp = pt.cdf - pt.cdfErr;
  const Sp = pt.sf + pt.sfErr;
  let wUp = Sp;
  if (l < Infinity) {
    direct.at(q, pt);
    wUp = Math.min(Sp, pt.cdf + pt.cdfErr - Fp);
  }
  if (!Number.isFinite(wUp)) return undefined;
  const w = Math.min(1, Math.max(0, wUp) * (1 + 4 * EPS));
  const J = ((2 * fmax) / c) * (1 + 4 * EPS);
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
 * less the derived bounds of both values.
 */
export function truncatedNormalMajorant(mu: number, sigma: number, lower?: number, upper?: number): LogMajorant | undefined {
  const a = lower ?? -Infinity;
  const b = upper ?? Infinity;
  const al = (a - mu) / sigma;
  const be = (b - mu) / sigma;
  // Phi with its derived bound (./families/normal-bounded.ts); the ends' own rounding (a difference and a quotient) moves
  // each value by phi times 2u |z| at most
  const Phi = (z: number) => {
    if (z === Infinity) return { v: 1, e: 0 };
    if (z === -Infinity) return { v: 0, e: 0 };
    const b = normalCdfBounded(z);
    return { v: b.v, e: b.e + (Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI)) * 2 * EPS * Math.abs(z) * 1.01 };
  };
  const [p1, p2] = al > 0 ? [Phi(-al), Phi(-be)] : [Phi(be), Phi(al)];
  const Z = (p1.v - p1.e - (p2.v + p2.e)) * (1 - 4 * EPS);
  if (!(Z > 0) || !(sigma > 0)) return undefined;
  const phi = (z: number) => (Number.isFinite(z) ? Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI) : 0);
  const m = 1 + 64 * EPS;
  const f = (z: number) => (phi(z) / (sigma * Z)) * m;
  const zm = Math.min(Math.max(0, al), be);
  // the slope about mu: g = (x - mu) f = z phi(z) / Z; E|X - mu| <= sigma sqrt(2 / pi) / Z (and <= the farther end's
  // distance), and g extended by 0 past the ends has at most two extrema, each |z phi(z)| <= phi(1), so TV(g) <= 4 phi(1) / Z
  const reach = Math.max(Math.abs(a - mu), Math.abs(b - mu)) * (1 + 2 * EPS);
  const slope = { center: mu, bounds: [[Math.min(reach, (sigma * Math.sqrt(2 / Math.PI) * m) / Z)], [0, (4 * phi(1) * m) / Z]] };
  return powerMajorant([[1], [0, 2 * f(zm)], [0, f(al) + f(be), (6 * phi(1) * m) / (sigma * sigma * Z)]], slope);
}
