import { gaussLegendre } from "./quadrature";

/**
 * A posteriori enclosures of the Gauss-Legendre nodes and weights as computed (./quadrature.ts, Newton on P_n): the true
 * node x_i of P_n(1 - 2x) on [0, 1] lies within dx_i of the computed x~_i, the true weight within dw_i of w~_i.
 * Nodes: P_n is evaluated exactly (BigInt, at dyadic points) at x~_i -+ delta_i: a change of sign puts a root inside,
 * and n disjoint such intervals hold the n roots one each (P_n has n simple roots), so dx_i = delta_i.
 *   2^n P_n(z) = sum_k (-1)^k C(n, k) C(2n - 2k, n) z^{n - 2k}   (Abramowitz & Stegun 22.3.8)
 * Weights: w_i = 1 / g(z_i) on [0, 1], g(z) = (1 - z^2) P_n'(z)^2 (A&S 25.4.29 halved), with g and g' exact at
 * z~ = 1 - 2 x~_i and |g''| bounded on [-1, 1] through |P_n^(k)| <= P_n^(k)(1) (Szego, Orthogonal Polynomials, 7.21);
 * |g(z_i) - g(z~)| <= d (|g'(z~)| + d sup |g''|), d = 2 dx_i.
 */
export interface GlEnclosure {
  /** |x_i - x~_i| <= dx[i] (on [0, 1]) */
  dx: Float64Array;
  /** |w_i - w~_i| <= dw[i] */
  dw: Float64Array;
  /** max_i dw_i / w~_i */
  dwRel: number;
  /** max_i dx_i */
  dxMax: number;
}

const CACHE = new Map<number, GlEnclosure>();
const U = Number.EPSILON / 2;

/** a double as M / 2^D exactly (M, D BigInt, D >= 0), for finite x with |x| < 2^53 */
export function dyadic(x: number): { m: bigint; d: bigint } {
  let d = 0n;
  let y = x;
  while (!Number.isInteger(y)) {
    y *= 2;
    d++;
  }
  return { m: BigInt(y), d };
}

/** the binomial coefficient C(n, k) exactly */
export function binom(n: number, k: number): bigint {
  let r = 1n;
  for (let j = 1; j <= k; j++) r = (r * BigInt(n - k + j)) / BigInt(j);
  return r;
}

/** coefficients c_j of 2^n P_n(z) = sum_j c_j z^j (integers) */
function legendreCoefficients(n: number): bigint[] {
  const c: bigint[] = new Array(n + 1).fill(0n);
  for (let k = 0; 2 * k <= n; k++) c[n - 2 * k] = (k % 2 ? -1n : 1n) * binom(n, k) * binom(2 * n - 2 * k, n);
  return c;
}

/** sum_j c_j (Z / 2^D)^j times 2^{D deg}: the sign and the value of the polynomial at Z / 2^D, scaled by 2^{D deg} */
function polyScaled(c: bigint[], Z: bigint, D: bigint): bigint {
  const deg = c.length - 1;
  // Horner in Z with the powers of 2^D: sum_j c_j Z^j 2^{D (deg - j)}
  let s = 0n;
  for (let j = deg; j >= 0; j--) s = s * Z + c[j] * (1n << (D * BigInt(deg - j)));
  return s;
}

function derivative(c: bigint[]): bigint[] {
  return c.slice(1).map((v, j) => v * BigInt(j + 1));
}

/** P_n(1 - 2y)'s sign at y = M / 2^D */
function signAt(c: bigint[], y: { m: bigint; d: bigint }): number {
  // z = 1 - 2y = (2^D - 2M) / 2^D
  const Z = (1n << y.d) - 2n * y.m;
  const v = polyScaled(c, Z, y.d);
  return v > 0n ? 1 : v < 0n ? -1 : 0;
}

/** num / den (BigInt, den > 0) as a double within 2^-60 relative (plus the final rounding, u) */
function ratio(num: bigint, den: bigint): number {
  if (num === 0n) return 0;
  const neg = num < 0n;
  const a = neg ? -num : num;
  const shift = BigInt(Math.max(0, 64 - (a.toString(2).length - den.toString(2).length)));
  const q = Number((a << shift) / den) * Math.pow(2, -Number(shift));
  return neg ? -q : q;
}

/** P_n^(k)(1) = prod_{j < k} (n (n + 1) - j (j + 1)) / (2^k k!), the largest |P_n^(k)| on [-1, 1] */
function derivAtOne(n: number, k: number): number {
  let p = 1;
  for (let j = 0; j < k; j++) p *= (n * (n + 1) - j * (j + 1)) / (2 * (j + 1));
  return p * (1 + 4 * k * U);
}

function enclose(n: number): GlEnclosure {
  if (!(Number.isInteger(n) && n >= 2)) throw new Error(`glEnclosure: n = ${n} (at least 2)`);
  const { x, w } = gaussLegendre(n);
  const c = legendreCoefficients(n);
  const c1 = derivative(c);
  const c2 = derivative(c1);
  const dx = new Float64Array(n);
  const dw = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const xi = dyadic(x[i]);
    // delta = 2^e from a few units of x~'s last place up, until P_n changes sign across [x~ - delta, x~ + delta]
    let e = Math.floor(Math.log2(x[i])) - 52;
    let found = false;
    for (let it = 0; it < 60 && !found; it++, e++) {
      const D = xi.d > BigInt(-e) ? xi.d : BigInt(-e);
      const M = xi.m << (D - xi.d);
      const del = 1n << (D + BigInt(e));
      const sl = signAt(c, { m: M - del, d: D });
      const sr = signAt(c, { m: M + del, d: D });
      if (sl * sr < 0) {
        dx[i] = Math.pow(2, e);
        found = true;
      }
    }
    if (!found) dx[i] = Infinity;
  }
  // disjoint intervals, one root each (the computed nodes increase with i)
  for (let i = 0; i + 1 < n; i++) if (!(x[i] + dx[i] < x[i + 1] - dx[i + 1])) dx[i] = dx[i + 1] = Infinity;
  // |g''| <= 2 A1^2 + 8 A1 A2 + 2 (A2^2 + A1 A3) on [-1, 1], g = (1 - z^2) P'^2 with P = P_n (c holds 2^n P_n)
  const A1 = derivAtOne(n, 1);
  const A2 = derivAtOne(n, 2);
  const A3 = derivAtOne(n, 3);
  const g2 = (2 * A1 * A1 + 8 * A1 * A2 + 2 * (A2 * A2 + A1 * A3)) * (1 + 16 * U);
  let dwRel = 0;
  let dxMax = 0;
  const scale = 1n << BigInt(2 * n); // (2^n)^2: c1, c2 carry 2^n P_n', 2^n P_n''
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(dx[i])) {
      dw[i] = Infinity;
      dwRel = Infinity;
      dxMax = Infinity;
      continue;
    }
    // z~ = Z / 2^D exactly; g(z~) = (1 - z~^2) P'(z~)^2 and g'(z~) = -2 z~ P'^2 + 2 (1 - z~^2) P' P'' as exact ratios
    const xi = dyadic(x[i]);
    const D = xi.d;
    const Z = (1n << D) - 2n * xi.m;
    const one = 1n << D;
    const deg1 = BigInt(n - 1);
    // with p1 = 2^{D (n - 1)} 2^n P'(z~) and p2 = 2^{D (n - 2)} 2^n P''(z~), both g and g' come over powers of two:
    //   g = omz p1^2 / (2^{2n} 2^{2D + 2D (n - 1)}),  g' = (-2 Z p1^2 + 2 omz p1 p2) / (2^{2n} 2^{D (1 + 2 (n - 1))})
    const p1 = polyScaled(c1, Z, D);
    const p2 = polyScaled(c2, Z, D);
    const omz = one * one - Z * Z; // (1 - z~^2) 2^{2D}
    const g = ratio(omz * p1 * p1, scale << (2n * D + 2n * D * deg1));
    const gp = ratio(-2n * Z * p1 * p1 + 2n * omz * p1 * p2, scale << (D * (1n + 2n * deg1)));
    const d = 2 * dx[i];
    const r = d * (Math.abs(gp) * (1 + 4 * U) + d * g2) * (1 + 4 * U);
    const gl = g * (1 - 2 ** -58);
    if (!(r < gl / 2)) {
      dw[i] = Infinity;
      dwRel = Infinity;
      continue;
    }
    // w_i in 1/g~ [1 / (1 + rho), 1 / (1 - rho)], rho = r / g~ (+ g~'s own 2^-60 and its division)
    const rho = r / gl + 2 ** -57;
    const mid = 1 / g;
    dw[i] = (Math.abs(w[i] - mid) + mid * (rho / (1 - rho) + 2 * U)) * (1 + 8 * U);
    dwRel = Math.max(dwRel, dw[i] / w[i]);
    dxMax = Math.max(dxMax, dx[i]);
  }
  return { dx, dw, dwRel: dwRel * (1 + 2 * U), dxMax };
}

/** the enclosures of gaussLegendre(n)'s nodes and weights, cached per n */
export function glEnclosure(n: number): GlEnclosure {
  let e = CACHE.get(n);
  if (!e) CACHE.set(n, (e = enclose(n)));
  return e;
}
