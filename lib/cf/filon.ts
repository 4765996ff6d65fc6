/**
 * Partial Fourier transforms int_a^b f(u) e^{i s u} du of a density f at any frequency s for a cost that does not grow
 * with s: a Filon-type rule (Iserles & Norsett 2005, Proc. R. Soc. A 461, "Efficient quadrature of highly oscillatory
 * integrals using derivatives", sec. 1; Filon 1928). On each panel f is replaced by its interpolant of degree M - 1 at
 * the M Gauss-Legendre nodes, written in Legendre polynomials, and each P_n is integrated against the exponential
 * exactly by Bauer's expansion, int_{-1}^{1} P_n(x) e^{i w x} dx = 2 i^n j_n(w) (DLMF 18.17.19; j_n the spherical
 * Bessel functions). The error is that of the interpolant, |int (f - p) e^{isu}| <= int |f - p|, the same at every s.
 * With a bound of f on complex discs (opts.disc) it is derived per panel (Hermite's formula, ./filon-remainder.ts, and
 * the values' and coefficients' rounding, derivedFit below); without one it is measured at points between the nodes,
 * an estimate. Panels of negligible mass take the exact bound |int f e^{isu}| <= mass (the panel is then dropped).
 */
import { gaussLegendre } from "./quadrature";
import { glEnclosure } from "./gl-enclosure";
import { legendreTableError, panelRemainder } from "./filon-remainder";
import { besselErrors, EXTRA, M, sphericalBessel } from "./filon-bessel";

export { sphericalBessel };

/** what makes the rule's error derived (see oscillatoryIntegral) */
export interface FilonOptions {
  /** log of an upper bound on |f(z)| over |z - m| <= R (f continued analytically from the panel), Infinity if none */
  disc?: (m: number, R: number) => number;
  /** a bound on the error of the computed f(u) */
  fErr?: (u: number) => number;
  /** f(u) is evaluated at offset + u (the argument's rounding moves it by u |offset + u|) */
  offset?: number;
  /** how many times a panel may be halved to meet its error budget (default 10 with a disc, else 5) */
  maxDepth?: number;
}

/** the Gauss-Legendre nodes' enclosure on [-1, 1] (twice that on [0, 1]) */
let PR: { dx: number; tab: Float64Array; absX: Float64Array } | null = null;
const P_RULE = () => {
  if (PR) return PR;
  const R = rule();
  // x = 2 v - 1 adds u to the enclosure of v's node (doubled on [-1, 1]); the table's own exact errors
  PR = { dx: 2 * glEnclosure(M).dxMax + Number.EPSILON, tab: legendreTableError(R.x, R.P, M), absX: R.x.map(Math.abs) };
  return PR;
};

/** check points per panel for the interpolation error */
const CHECKS = 33;

interface Rule {
  x: Float64Array; // nodes on [-1, 1]
  w: Float64Array; // weights on [-1, 1]
  /** P_n(x_k) at [n * M + k] */
  P: Float64Array;
}
let RULE: Rule | null = null;
function rule(): Rule {
  if (RULE) return RULE;
  const g = gaussLegendre(M);
  const x = Float64Array.from(g.x, (v) => 2 * v - 1);
  const w = Float64Array.from(g.w, (v) => 2 * v);
  const P = new Float64Array(M * M);
  for (let k = 0; k < M; k++) {
    let p0 = 1;
    let p1 = x[k];
    P[k] = 1;
    if (M > 1) P[M + k] = p1;
    for (let n = 2; n < M; n++) {
      const p2 = ((2 * n - 1) * x[k] * p1 - (n - 1) * p0) / n;
      P[n * M + k] = p2;
      p0 = p1;
      p1 = p2;
    }
  }
  RULE = { x, w, P };
  return RULE;
}

/** Legendre series sum_n c_n P_n(x) by Clenshaw's recurrence. */
function legendreSum(c: Float64Array, off: number, x: number): number {
  let b1 = 0;
  let b2 = 0;
  for (let n = M - 1; n >= 1; n--) {
    // P_{n+1} = ((2n+1) x P_n - n P_{n-1}) / (n+1): Clenshaw with alpha_n = (2n+1) x / (n+1), beta_{n+1} = -(n+1)/(n+2)
    const b0 = c[off + n] + ((2 * n + 1) * x * b1) / (n + 1) - ((n + 1) * b2) / (n + 2);
    b2 = b1;
    b1 = b0;
  }
  return c[off] + x * b1 - 0.5 * b2;
}

export interface OscillatoryIntegral {
  /** int f(u) e^{i s u} du over the panels, into out[0] (re), out[1] (im) */
  at(s: number, out: Float64Array): void;
  /** bound on the absolute error of `at`, the same at every s, apart from the frequency's rounding (slope) */
  error: number;
  /** the frequency's rounding inside `at` moves its value by at most slope |s| */
  slope: number;
  /** number of panels the rule sums over (the cost of one frequency) */
  panels: number;
}

/**
 * Prepare int_{b_0}^{b_last} f(u) e^{i s u} du on the panels `bounds` (each split into `split` equal parts).
 * `mass(a, b)` is int_a^b f exactly (from the law's cdf): panels below `negligible` mass are dropped with their mass
 * counted as error; a panel whose interpolant misses by more than ~4 eps of its mass plus its share of 1e-15 is halved (at most
 * opts.maxDepth times; with a disc bound only the interpolation part counts, the rounding floor is not lowered by halving).
 */
export function oscillatoryIntegral(
  bounds: readonly number[],
  f: (u: number) => number,
  mass: (a: number, b: number) => number,
  opts: FilonOptions = {},
  split = 1,
  negligible = 1e-19,
): OscillatoryIntegral {
  const R = rule();
  const mids: number[] = [];
  const halves: number[] = [];
  // with a disc bound: int |p| over each panel, at most its mass plus the derived int |f - p| (f >= 0)
  const l1p: number[] = [];
  const coefs: number[] = [];
  let error = 0;
  const gv = new Float64Array(M);
  const c = new Float64Array(M);
  const pr = P_RULE();
  // fit one panel: its Legendre coefficients into c, and the bound on int |f - p| over it
  const fit = (a: number, b: number, pm: number): { err: number; floor: number; absSum: number } => {
    const mid = (a + b) / 2;
    const half = (b - a) / 2;
    for (let k = 0; k < M; k++) gv[k] = f(mid + half * R.x[k]);
    let absSum = 0;
    for (let n = 0; n < M; n++) {
      let s = 0;
      for (let k = 0; k < M; k++) s += R.w[k] * gv[k] * R.P[n * M + k];
      c[n] = ((2 * n + 1) / 2) * s;
      absSum += Math.abs(c[n]);
    }
    const trivial = pm + 2 * half * absSum;
    if (opts.disc) {
      const e = derivedFit(opts, pr, mid, half, absSum);
      // halving lowers the interpolation part, not the rounding floor
      return e.interp + e.floor <= trivial ? { err: e.interp, floor: e.floor, absSum } : { err: trivial, floor: 0, absSum };
    }
    // no analytic bound for this claim law: the interpolant's error measured between the nodes (and at the ends), and
    // from the last coefficients (an estimate, not a bound)
    let dev = 0;
    for (let i = 0; i < CHECKS; i++) {
      const x = Math.cos((Math.PI * (i + 0.5)) / CHECKS);
      const e = Math.abs(f(mid + half * x) - legendreSum(c, 0, x));
      if (!(e <= dev)) dev = Number.isFinite(e) ? Math.max(dev, e) : Infinity;
    }
    for (const x of [-1, 1]) {
      const fx = f(mid + half * x);
      if (Number.isFinite(fx)) dev = Math.max(dev, Math.abs(fx - legendreSum(c, 0, x)));
    }
    const tail = 2 * (Math.abs(c[M - 1]) + Math.abs(c[M - 2]));
    // int |f - p| <= 2 half max|f - p|; where that exceeds the panel's mass plus int |p|, the latter holds exactly
    const interp = 2 * half * Math.max(2 * dev, tail);
    return { err: Math.min(interp, trivial), floor: 0, absSum };
  };
  /**
   * the derived bound on int |f - p| over [mid - half, mid + half] (p with the coefficients c as computed): f - p = (f - p^)
   * + (p^ - p), p^ the exact interpolant at the nodes u_k as placed, u_k = mid + half xi_k. The first by the disc
   * (./filon-remainder.ts); the second, q = p^ - p, has degree M - 1 and q(xi_k) = r_k = f(u_k) - p(xi_k): with the true
   * Gauss nodes x_k (|xi_k - x_k| <= e), weights w_k, int q^2 = sum w_k q(x_k)^2 (exact for degree 2M - 2), |q(x_k) -
   * r_k| <= (M - 1)^2 Q e (Markov), and Q = ||q||_inf <= M / sqrt 2 ||q||_2 (Legendre expansion, Cauchy-Schwarz), so Q <=
   * M r / (1 - M (M - 1)^2 e) and int_{-1}^{1} |q| <= sqrt 2 ||q||_2 <= 2 (r + (M - 1)^2 e Q), r = max |r_k|. |r_k| is
   * the computed residual (its subtraction u of it) plus: the value's own bound (opts.fErr), the argument's rounding
   * (|f'| u |offset + u_k|), p(x~_k)'s error as summed from the table (sum |c_n| tab_n, the table's exact errors, plus
   * gamma_M sum |c_n P_n|, Higham 3.1) and p's move from x~_k to xi_k (sum |c_n| n (n + 1) / 2 |xi_k - x~_k|, |P_n'| <=
   * n (n + 1) / 2, Szego 7.21; xi_k within u of the computed (u_k - mid) / half). The panel as stored ([mid - half,
   * mid + half]) differs from [a, b] by 2u (|a| + |b|) at most at each end, where |f| <= fmax.
   */
  const derivedFit = (o: FilonOptions, prr: { dx: number; tab: Float64Array; absX: Float64Array }, mid: number, half: number, absSum: number): { interp: number; floor: number } => {
    const U = Number.EPSILON;
    // gamma_M at the unit roundoff u = eps / 2 (Higham 3.1: M products and M - 1 sums)
    const gM = (M * U) / (2 - M * U);
    let d1 = 0;
    let tabSum = 0;
    for (let n = 1; n < M; n++) d1 += (Math.abs(c[n]) * n * (n + 1)) / 2;
    for (let n = 0; n < M; n++) tabSum += Math.abs(c[n]) * prr.tab[n];
    let shift = 0;
    for (let k = 0; k < M; k++) shift = Math.max(shift, Math.abs((mid + half * R.x[k] - mid) / half - R.x[k]) + 1.01 * U);
    const e = prr.dx + shift; // |xi_k - x_k| (true nodes on [-1, 1])
    const rem = panelRemainder(o.disc!, mid, half, M, e, prr.absX);
    if (!(rem.l1 < Infinity)) return { interp: Infinity, floor: 0 };
    let r = 0;
    for (let k = 0; k < M; k++) {
      let p = 0;
      let pa = 0;
      for (let n = 0; n < M; n++) {
        const t = c[n] * R.P[n * M + k];
        p += t;
        pa += Math.abs(t);
      }
      const u = mid + half * R.x[k];
      const diff = Math.abs(gv[k] - p);
      const rk = diff * (1 + U) + (o.fErr ? o.fErr(u) : Infinity) + rem.slope * U * (Math.abs(o.offset ?? 0) + Math.abs(u)) + gM * pa;
      if (!(rk <= r)) r = Number.isNaN(rk) ? Infinity : Math.max(r, rk);
    }
    r = (r + tabSum + d1 * shift) * (1 + 4 * U);
    const mu = M * (M - 1) * (M - 1) * e;
    if (!(mu < 0.5)) return { interp: Infinity, floor: 0 };
    const Q = (M * r) / (1 - mu);
    const qInt = 2 * half * (r + (M - 1) * (M - 1) * e * Q);
    const ends = 2 * 2 * U * (Math.abs(mid - half) + Math.abs(mid + half)) * rem.fmax;
    return { interp: rem.l1 * (1 + 1e-12), floor: (qInt + ends) * (1 + 1e-12) };
  };
  // each given panel is halved (up to MAX_DEPTH times) until its interpolant is within its error budget
  const MAX_DEPTH = opts.maxDepth ?? (opts.disc ? 10 : 5);
  const span = Math.max(bounds[bounds.length - 1] - bounds[0], 1e-300);
  const stack: [number, number, number][] = [];
  for (let j = bounds.length - 2; j >= 0; j--) {
    const wAll = bounds[j + 1] - bounds[j];
    if (!(wAll > 0)) continue;
    for (let q = split - 1; q >= 0; q--) {
      const a = bounds[j] + (q * wAll) / split;
      const b = q + 1 === split ? bounds[j + 1] : bounds[j] + ((q + 1) * wAll) / split;
      stack.push([a, b, 0]);
    }
  }
  while (stack.length) {
    const [a, b, depth] = stack.pop()!;
    const pm = mass(a, b);
    if (pm < negligible) {
      error += Math.max(pm, 0) + 1e-300;
      continue;
    }
    const r = fit(a, b, pm);
    // the budget: ~4 eps of the panel's mass plus its share of 1e-15 over the whole range, and never below the
    // rounding floor of the measurement itself (a few ulps of f at the check points, which halving does not lower)
    const budget = 4 * Number.EPSILON * pm + (1e-15 * (b - a)) / span + 64 * Number.EPSILON * (b - a) * r.absSum;
    if (r.err > budget && depth < MAX_DEPTH) {
      const m = (a + b) / 2;
      stack.push([m, b, depth + 1], [a, m, depth + 1]);
      continue;
    }
    // (with a disc bound the floor carries the coefficients' rounding and `at`'s own is derived below: no allowance)
    error += r.err + r.floor + (opts.disc ? 0 : 8 * Number.EPSILON * (b - a) * r.absSum);
    mids.push((a + b) / 2);
    halves.push((b - a) / 2);
    l1p.push(opts.disc ? (pm + r.err + r.floor) * (1 + 4 * Number.EPSILON) : Infinity);
    for (let n = 0; n < M; n++) coefs.push(c[n]);
  }
  const P = mids.length;
  const mid = Float64Array.from(mids);
  const hf = Float64Array.from(halves);
  const cf = Float64Array.from(coefs);
  const jn = new Float64Array(M);
  // what `at` adds (u = eps / 2, gamma_k = k u / (1 - k u); Higham 2nd ed. sec. 3.1, 4.2): per panel the Bessel values'
  // errors sum |c_n| E_n (./filon-bessel.ts), the 8-term sums (gamma_6 of sum |c_n| |j_n^|, |j_n| <= 1), the product
  // with the phase (cos and sin within one ulp, 2 + 2 u each part) and by 2 h (u): within 20 u of A = sum |c_n| (1 + E_n),
  // times 2 h; the panels in blocks of 64, gamma_{min(P, 64) - 1 + ceil(P / 64) - 1} of the terms' moduli (<= 2 h A
  // each part). The frequency's own rounding inside (s m within u |s m|; w = |s| h within u w, and d/dw int_{-1}^{1} p
  // e^{iwx} dx = int i x p e^{iwx}) moves each panel's value by at most u |s| (|m| + h) V, V = int |p| over the panel
  // (at most 2 h A, and with a disc bound its mass plus int |f - p|): the slope, per unit |s|
  const E = besselErrors(M, EXTRA);
  let besAbs = 0;
  let absA = 0;
  let slope = 0;
  for (let p = 0; p < P; p++) {
    let a = 0;
    let e = 0;
    for (let n = 0; n < M; n++) {
      const cn = Math.abs(cf[p * M + n]);
      a += cn * (1 + E[n]);
      e += cn * E[n];
    }
    besAbs += 2 * hf[p] * e;
    absA += 2 * hf[p] * a;
    slope += Math.min(2 * hf[p] * a, l1p[p]) * (Math.abs(mid[p]) + hf[p]);
  }
  const U = Number.EPSILON / 2;
  const b = Math.min(P, 64) - 1 + Math.max(Math.ceil(P / 64) - 1, 0);
  error += (besAbs + (20 * U + (2 * b * U) / (1 - b * U)) * absA) * (1 + 1e-10);
  return {
    error,
    slope: U * slope * (1 + 1e-10),
    panels: P,
    at(s, out) {
      // the panels in blocks of 64 (the rounding bound above)
      let sr = 0;
      let si = 0;
      let br = 0;
      let bi = 0;
      const sign = s < 0 ? -1 : 1;
      for (let p = 0; p < P; p++) {
        const w = Math.abs(s) * hf[p];
        sphericalBessel(w, jn);
        const o = p * M;
        // sum c_n 2 i^n j_n(w) at w = |s| half; j_n(-w) = (-1)^n j_n(w) folds the sign of s into the odd terms
        let er = 0;
        let ei = 0;
        for (let n = 0; n < M; n += 4) {
          er += cf[o + n] * jn[n] - (n + 2 < M ? cf[o + n + 2] * jn[n + 2] : 0);
          ei += cf[o + n + 1] * jn[n + 1] - (n + 3 < M ? cf[o + n + 3] * jn[n + 3] : 0);
        }
        ei *= sign;
        const ph = s * mid[p];
        const cr = Math.cos(ph);
        const ci = Math.sin(ph);
        const k = 2 * hf[p];
        br += k * (er * cr - ei * ci);
        bi += k * (er * ci + ei * cr);
        if ((p & 63) === 63) {
          sr += br;
          si += bi;
          br = 0;
          bi = 0;
        }
      }
      out[0] = sr + br;
      out[1] = si + bi;
    },
  };
}

/**
 * A mesh on [lo, hi] (cut at `cuts`) for the rule with a disc bound: from each panel's left end the widest panel (grown
 * by 1.5 from the last, shrunk by 1.5) whose derived interpolation part (filon-remainder.ts, no values needed) is
 * within the rule's budget for it (64 u of its mass plus its share of 1e-15; the fit's own budget is at least that), or
 * whose mass is below `negligible` (dropped). `first` is the first width tried. The fit halves any panel still over.
 */
export function discMesh(lo: number, hi: number, cuts: readonly number[], first: number, disc: (m: number, R: number) => number, mass: (a: number, b: number) => number, negligible = 1e-19): number[] {
  const pr = P_RULE();
  const span = Math.max(hi - lo, 1e-300);
  const ok = (a: number, b: number) => {
    const pm = mass(a, b);
    if (pm < negligible) return true;
    const mid = (a + b) / 2;
    const half = (b - a) / 2;
    const e = pr.dx + 1.01 * Number.EPSILON * (Math.abs(mid) / half + 2);
    const rem = panelRemainder(disc, mid, half, M, e, pr.absX);
    return rem.l1 <= 64 * Number.EPSILON * pm + (1e-15 * (b - a)) / span;
  };
  const ends = [...new Set([lo, ...cuts.filter((c) => c > lo && c < hi), hi])].sort((a, b) => a - b);
  const out = [lo];
  let w = first;
  for (let j = 0; j + 1 < ends.length; j++) {
    let a = ends[j];
    const end = ends[j + 1];
    while (a < end && out.length < 4000) {
      let b = Math.min(end, a + w);
      if (ok(a, b)) {
        // grow while the wider panel still passes
        while (b < end && ok(a, Math.min(end, a + w * 1.5))) {
          w *= 1.5;
          b = Math.min(end, a + w);
        }
      } else {
        let tries = 0;
        while (!ok(a, b) && tries++ < 60) {
          w /= 1.5;
          b = Math.min(end, a + w);
        }
      }
      if (!(b > a)) break;
      out.push(b);
      a = b;
      w *= 1.5;
    }
    if (out[out.length - 1] < end) out.push(end);
  }
  return out;
}
