import { normalCdfBounded } from "./normal-bounded";
import { gaussLegendre } from "../quadrature";
import { glEnclosure } from "../gl-enclosure";

const EPS = Number.EPSILON;
const U = EPS / 2;
const SQRT_2PI = Math.sqrt(2 * Math.PI);
/** from |t| sigma = T_ASYM on the boundary expansion, below it the quadrature */
const T_ASYM = 30;
/** Gauss-Legendre points per panel and the Bernstein ellipse parameter of its bound */
const GL_N = 16;
const RHO = 8;

/**
 * The CF of N(mu, sigma^2) conditioned on [a, b] (JKB vol. 1, ch. 13, sec. 10.1), f = phi(z) / (sigma Z), z = (x - mu) / sigma,
 * Z = Phi(beta) - Phi(alpha) (from Phi with its derived bound, ./normal-bounded.ts, upper tails past the mean), with one
 * absolute error bound for every t:
 *  - |t| sigma < T_ASYM: composite 16-point Gauss-Legendre on panels of at most sigma/4 and 1.5/|t| over [from, to] (the law's
 *    interval, cut 40 sd beyond an open end: the mass there, 2 Q(40) / Z, is added to the bound), centred at the mean and
 *    summed with Neumaier's compensation. The integrand is entire; on the Bernstein ellipse rho = 8 of a panel of half-width
 *    h (<= sigma/8, <= 0.75/|t|) |Im x| <= v = h (rho - 1/rho)/2, so |f| <= e^{v^2 / (2 sigma^2)} / (sigma sqrt(2 pi) Z) and
 *    |e^{i t x}| <= e^{|t| v}, and the panel's error is at most (64/15) M rho^{-32} / (rho^2 - 1) h (Trefethen, SIAM Review
 *    50 (2008), thm 4.5). The rounding per node (the exponent's, the phase's, the nodes' and weights') is bounded from its
 *    parts' sizes, taken at their largest over |z| <= 10 and, beyond, through the mass there (f <= phi(10) / (sigma Z)).
 *  - |t| sigma >= T_ASYM: integration by parts K times (Olver, Asymptotics and Special Functions, ch. 3 sec. 3),
 *    int_a^b f e^{i t x} = sum_{k<K} (-1)^k [f^{(k)} e^{i t x}]_a^b / (i t)^{k+1} + (-1)^K / (i t)^K int f^{(K)} e^{i t x},
 *    f^{(k)} = (-1)^k He_k(z) phi(z) / (sigma^{k+1} Z) (Hermite polynomials, common practice), and the remainder at most
 *    int |f^{(K)}| <= sqrt(K!) / (sigma^K Z) over |t|^K (Cauchy-Schwarz with int He_K^2 phi = K!). He_k by its recurrence
 *    with the running bound of its absolute-value twin; every term's bound falls with |t|, so the bound at |t| sigma = T_ASYM
 *    holds beyond.
 * Z's relative error moves every value by at most that (|phi| <= 1).
 */
export function truncatedNormalCf(mu: number, sigma: number, a: number, b: number, mean: number): { phi(t: number): [number, number]; absError: number } {
  const al = (a - mu) / sigma;
  const be = (b - mu) / sigma;
  const P = (z: number) => (z === Infinity ? { v: 1, e: 0 } : z === -Infinity ? { v: 0, e: 0 } : normalCdfBounded(z, { v: NaN, e: NaN }));
  const [p1, p2] = al > 0 ? [P(-al), P(-be)] : [P(be), P(al)];
  const Z = p1.v - p2.v;
  const zRel = ((p1.e + p2.e + U * (p1.v + p2.v)) / Math.max(Z - p1.e - p2.e, 1e-300)) * 1.01;
  const logZ = Math.log(Z);
  const from = Number.isFinite(a) ? a : mu - 40 * sigma;
  const to = Number.isFinite(b) ? b : mu + 40 * sigma;
  const width = to - from;
  // the mass cut off 40 sd beyond an open end: Q(40) <= phi(40) / 40
  const cut = ((Number.isFinite(a) ? 0 : 1) + (Number.isFinite(b) ? 0 : 1)) * (Math.exp(-800) / (40 * SQRT_2PI)) / Z;
  const GL = gaussLegendre(GL_N);

  const quad = (t: number): [number, number] => {
    const pw = Math.min(sigma / 4, t !== 0 ? 1.5 / Math.abs(t) : Infinity);
    const m = Math.max(1, Math.ceil(width / pw));
    const w = width / m;
    let sr = 0;
    let cr = 0;
    let si = 0;
    let ci = 0;
    for (let q = 0; q < m; q++) {
      const lo = from + q * w;
      for (let k = 0; k < GL_N; k++) {
        const x = lo + GL.x[k] * w;
        const z = (x - mu) / sigma;
        const fx = (GL.w[k] * w * Math.exp(-0.5 * z * z - logZ)) / (sigma * SQRT_2PI);
        if (fx === 0) continue;
        const th = t * (x - mean);
        const vr = fx * Math.cos(th);
        const vi = fx * Math.sin(th);
        // Neumaier's compensated sums
        const tr = sr + vr;
        cr += Math.abs(sr) >= Math.abs(vr) ? sr - tr + vr : vr - tr + sr;
        sr = tr;
        const ti = si + vi;
        ci += Math.abs(si) >= Math.abs(vi) ? si - ti + vi : vi - ti + si;
        si = ti;
      }
    }
    const r = sr + cr;
    const i = si + ci;
    const c = Math.cos(t * mean);
    const s = Math.sin(t * mean);
    return [r * c - i * s, r * s + i * c];
  };

  // boundary terms at the finite ends: c_k(x) = f^{(k)}(x) (-1)^k = He_k(z) phi(z) / (sigma^{k+1} Z), with the bound of its error
  const ends: { x: number; sign: number; c: number[]; e: number[] }[] = [];
  const K_MAX = 60;
  for (const [x, sign] of [
    [b, 1],
    [a, -1],
  ] as const) {
    if (!Number.isFinite(x)) continue;
    const z = (x - mu) / sigma;
    const dz = U * ((Math.abs(x) + Math.abs(mu)) / sigma + Math.abs(z)) * 1.01;
    const ph = Math.exp(-0.5 * z * z) / SQRT_2PI;
    // phi(z)'s relative error: the exponent's (|z| dz + u z^2 / 2) and the exp's and the quotient's
    const phRel = (Math.abs(z) * dz + U * (0.5 * z * z + 4)) * 1.01;
    const c: number[] = [];
    const e: number[] = [];
    let h0 = 1;
    let h1 = z;
    let g0 = 1;
    let g1 = Math.abs(z);
    let s = sigma * Z;
    for (let k = 0; k < K_MAX; k++) {
      const hk = k === 0 ? h0 : h1;
      const gk = k === 0 ? g0 : g1;
      c.push((hk * ph) / s);
      // the recurrence's running error (2k + 2) u g_k, z's own error moving He_k by at most k g_{k-1} dz <= k g_k dz / |z|-free
      // bound k (g_k + 1) dz, phi's and the quotients' relative errors
      e.push((((2 * k + 4) * U * gk + k * (gk + 1) * dz + Math.abs(hk) * (phRel + (k + 4) * U)) * ph) / s + zRel * Math.abs(hk * ph / s));
      if (k >= 1) {
        const h2 = z * h1 - k * h0;
        const g2 = Math.abs(z) * g1 + k * g0;
        h0 = h1;
        h1 = h2;
        g0 = g1;
        g1 = g2;
      }
      s *= sigma;
    }
    ends.push({ x, sign, c, e });
  }
  // sqrt(K!) / (sigma |t|)^K / Z, least over K at the given |t| sigma, with the K reached
  const remainder = (ts: number) => {
    let best = Infinity;
    let K = 0;
    let lf = 0;
    for (let k = 1; k <= K_MAX; k++) {
      lf += Math.log(k);
      const v = Math.exp(0.5 * lf - k * Math.log(ts) - logZ);
      if (v < best) {
        best = v;
        K = k;
      }
    }
    return { R: best * 1.01, K };
  };
  const asym = (t: number): [number, number] => {
    const { K } = remainder(Math.abs(t) * sigma);
    let re = 0;
    let im = 0;
    for (const end of ends) {
      const th = t * end.x;
      const cr = Math.cos(th);
      const ci = Math.sin(th);
      // 1 / (i t)^{k+1} = (-i / t)^{k+1}
      let pr = 0;
      let pi = -1 / t;
      for (let k = 0; k < K; k++) {
        // (-1)^k f^{(k)} = c_k: the term (-1)^k [f^{(k)} e^{itx}] / (it)^{k+1} = sign c_k e^{itx} (-i/t)^{k+1}
        const v = end.sign * end.c[k];
        const er = v * cr;
        const ei = v * ci;
        re += er * pr - ei * pi;
        im += er * pi + ei * pr;
        const nr = pi / t;
        const ni = -pr / t;
        pr = nr;
        pi = ni;
      }
    }
    return [re, im];
  };

  // the bound: the larger of the two regimes' (each the largest over its own frequencies)
  const quadBound = (() => {
    const rh = (RHO - 1 / RHO) / 2;
    const M = Math.exp(0.5 * (rh / 8) ** 2 + 0.75 * rh) / (sigma * SQRT_2PI * Z);
    const bern = ((width / 2) * (64 / 15) * M * Math.pow(RHO, -2 * GL_N)) / (RHO * RHO - 1);
    const tmax = T_ASYM / sigma;
    const X = Math.max(Math.abs(from), Math.abs(to));
    // per node, relative to its weight: the exponent (|z| <= 10: |z| |dz| + u z^2 / 2 + u |log Z|, dz <= u ((|x| + |mu|)/sigma + |z|)),
    // exp, the products with the weights (within a few u of their values as computed, 8u), the node's position (2u |x| moves
    // the integrand by at most (|f'| / f + |t|) of it: 2u X (10 / sigma + tmax)), the phase t (x - mean) (u (|x - mean| + |t (x - mean)|)
    // of the angle), cos and sin
    // the rule's own nodes and weights (../gl-enclosure.ts): a weight within dwRel of it, a node within dx of the panel's
    // [0, 1], i.e. w dx in x on a panel of width w <= min(sigma / 4, 1.5 / |t|), moving the integrand by at most
    // w dx (10 / sigma + |t|) <= 4 dx of it
    const gle = glEnclosure(GL_N);
    const rel =
      U * (10 * ((X + Math.abs(mu)) / sigma + 10) + 50 + 2 * Math.abs(logZ) + 16 + 2 * X * (10 / sigma + tmax) + 2 * tmax * (width + Math.abs(mean)) + 4) +
      (gle.dwRel + 4 * gle.dxMax) * (1 + 1e-9);
    // nodes beyond |z| = 10: their weights sum to at most the width, f below phi(10) / (sigma Z), their relative rounding below
    // the same sum at |z| = 40
    const far = ((width * Math.exp(-50)) / (SQRT_2PI * sigma * Z)) * U * (40 * ((X + Math.abs(mu)) / sigma + 40) + 800 + rel / U);
    // sum of the weights' values (the quadrature of f, at most 1 plus its own error) and Neumaier's 2u of it
    return bern + (1 + 1e-10) * (rel + 4 * U) + far + cut;
  })();
  const asymBound = (() => {
    if (ends.length === 0) return Infinity;
    const ts = T_ASYM;
    const t = ts / sigma;
    const { R, K } = remainder(ts);
    let e = R;
    for (const end of ends) {
      // the phase t x rounds within u |t x| (and cos, sin an ulp): |e^{i t x}| moves by u (|t x| + 2); each term's products
      // and the power of 1/t a few u more
      let inv = 1 / t;
      for (let k = 0; k < K; k++) {
        e += (end.e[k] + Math.abs(end.c[k]) * U * (Math.abs(t * end.x) + 2 * k + 8)) * inv;
        inv /= t;
      }
    }
    return e * 1.01;
  })();
  return {
    phi: (t) => (t === 0 ? [1, 0] : Math.abs(t) * sigma >= T_ASYM && ends.length > 0 ? asym(t) : quad(t)),
    absError: (Math.max(quadBound, ends.length ? asymBound : 0) + zRel) * (1 + 1e-6),
  };
}
