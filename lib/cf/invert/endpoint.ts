import { evalPart, type ContinuousPart, type EndpointKernels } from "./part";

/**
 * Fit the large-t expansion phi(t) ~ sum_e e^{i t e} sum_{j<J} c_{e,j} (-i s_e t)^{-(k+j)} at the finite support
 * endpoints e (s_e = +1 at the lower end, -1 at the upper end). For k = 1, c_{e,j} is the j-th derivative of the
 * density at the endpoint from inside; a density ~ c (x - e)^{k-1}/Gamma(k) gives the leading term for other k (integration by parts of int e^{itx} f(x) dx; e.g. Lukacs,
 * Characteristic Functions, 2nd ed., sec. 2.3), by least squares on samples far out in t; then express each
 * endpoint's expansion through gamma kernels e^{i t e}(1 - i s t/lambda)^{-(k+j)}, j < J, using
 * (1 + w)^{-m} = sum_n binom(-m, n) w^{-m-n}. Returns null when the samples are not described by such an
 * expansion (interior kinks, lattice parts): the caller then inverts without kernels.
 */
export function fitEndpointKernels(
  part: ContinuousPart,
  ends: { at: number; side: 1 | -1 }[],
  J: number,
  tBig: number,
  minRate: number,
  power = 1,
): { kernels: EndpointKernels[]; residual: number } | null {
  if (ends.length === 0) return null;
  const m = 24;
  const t = new Float64Array(m);
  for (let i = 0; i < m; i++) t[i] = tBig * Math.pow(2, i / 6) * (1 + 0.137 * (((i * 7) % 5) / 5));
  const re = new Float64Array(m);
  const im = new Float64Array(m);
  const bare = { ...part, center: 0, kernels: [], mass: 1 };
  evalPart(bare, t, re, im);
  const P = ends.length * J;
  const rows = 2 * m;
  // column-major design matrix, columns scaled so |entries| <= 1
  const A: Float64Array[] = [];
  for (let q = 0; q < P; q++) A.push(new Float64Array(rows));
  const b = new Float64Array(rows);
  for (let i = 0; i < m; i++) {
    b[2 * i] = re[i];
    b[2 * i + 1] = im[i];
    for (let e = 0; e < ends.length; e++) {
      const { at, side } = ends[e];
      const ca = Math.cos(t[i] * at);
      const sa = Math.sin(t[i] * at);
      // v = tBig / (-i s t) = (tBig / t) e^{i s pi/2}; basis v^{power + j}
      const vi = tBig / (side * t[i]);
      const m0 = Math.pow(tBig / t[i], power);
      let pr = m0 * Math.cos((side * Math.PI * power) / 2);
      let pi = m0 * Math.sin((side * Math.PI * power) / 2);
      for (let j = 0; j < J; j++) {
        if (j > 0) {
          const nr = -pi * vi;
          pi = pr * vi;
          pr = nr;
        }
        const col = A[e * J + j];
        col[2 * i] = pr * ca - pi * sa;
        col[2 * i + 1] = pr * sa + pi * ca;
      }
    }
  }
  const x = leastSquares(A, b);
  if (!x) return null;
  let rr = 0;
  let bb = 0;
  for (let r = 0; r < rows; r++) {
    let s = 0;
    for (let q = 0; q < P; q++) s += A[q][r] * x[q];
    rr += (s - b[r]) ** 2;
    bb += b[r] ** 2;
  }
  const residual = Math.sqrt(rr / Math.max(bb, 1e-300));
  if (!(residual < 1e-4)) return null;
  const kernels: EndpointKernels[] = [];
  for (let e = 0; e < ends.length; e++) {
    const c: number[] = [];
    for (let j = 0; j < J; j++) c.push(x[e * J + j] * Math.pow(tBig, power + j));
    // the density's own decay rate near the end keeps the amplitudes b_m of order c_1 (no cancellation)
    let rate = minRate;
    // coefficients made dimensionless with the fit scale 1/tBig; fitted noise (relative 1e-8) is ignored
    const d = c.map((v, j) => Math.abs(v) / Math.pow(tBig, power + j));
    const dmax = Math.max(...d);
    const lead = d.findIndex((v) => v > 1e-4 * dmax);
    if (lead >= 0) {
      for (let j = lead + 1; j < J; j++) {
        if (!(d[j] > 1e-4 * dmax)) continue;
        const r = Math.pow(Math.abs(c[j] / c[lead]), 1 / (j - lead));
        if (Number.isFinite(r) && r > rate) rate = r;
      }
    }
    // the kernels' expansion in lambda/t holds only for t > lambda: keep lambda well below the fitted range
    rate = Math.min(rate, Math.max(minRate, tBig / 4));
    const bm: number[] = [];
    for (let j = 0; j < J; j++) {
      let v = c[j] / Math.pow(rate, power + j);
      for (let q = 0; q < j; q++) v -= bm[q] * binomNeg(power + q, j - q);
      bm.push(v);
    }
    if (bm.some((v) => !Number.isFinite(v))) return null;
    kernels.push({ at: ends[e].at, side: ends[e].side, rate, power, b: bm });
  }
  return { kernels, residual };
}

/** binom(-m, n) = (-1)^n m (m+1) ... (m+n-1) / n! (any real m > 0). */
function binomNeg(m: number, n: number): number {
  let c = 1;
  for (let i = 1; i <= n; i++) c = (c * (m + i - 1)) / i;
  return n % 2 === 0 ? c : -c;
}

/** Least squares by modified Gram-Schmidt QR (columns given separately); null when rank deficient. */
function leastSquares(cols: Float64Array[], b: Float64Array): Float64Array | null {
  const P = cols.length;
  const n = b.length;
  const Q = cols.map((c) => Float64Array.from(c));
  const R = new Float64Array(P * P);
  for (let j = 0; j < P; j++) {
    for (let i = 0; i < j; i++) {
      let d = 0;
      for (let r = 0; r < n; r++) d += Q[i][r] * Q[j][r];
      R[i * P + j] = d;
      for (let r = 0; r < n; r++) Q[j][r] -= d * Q[i][r];
    }
    let nrm = 0;
    for (let r = 0; r < n; r++) nrm += Q[j][r] ** 2;
    nrm = Math.sqrt(nrm);
    if (!(nrm > 1e-12)) return null;
    R[j * P + j] = nrm;
    for (let r = 0; r < n; r++) Q[j][r] /= nrm;
  }
  const y = new Float64Array(P);
  for (let j = 0; j < P; j++) {
    let d = 0;
    for (let r = 0; r < n; r++) d += Q[j][r] * b[r];
    y[j] = d;
  }
  const x = new Float64Array(P);
  for (let j = P - 1; j >= 0; j--) {
    let s = y[j];
    for (let q = j + 1; q < P; q++) s -= R[j * P + q] * x[q];
    x[j] = s / R[j * P + j];
  }
  return x;
}

/** At most this many jump kernels (the largest jumps first); the rest stay in what is inverted. */
const MAX_JUMP_KERNELS = 256;

/**
 * Exponential kernels for known jumps of the density (f(z+) - f(z-) = J): b e^{itz} / (1 - it/lambda) with
 * b lambda = J / w (w: the continuous part's weight) has the same jump at z, so what is left of the continuous part has
 * a continuous density there and its CF loses the J e^{itz} / (-it) term (integration by parts, as above). Each kernel
 * lives on [z, inf): its rate is chosen so that it is spent (e^{-60}) by the window's right end, b_hi; jumps at or
 * beyond b_hi are left in. With the steps of the density's slope and second derivative known too (`kinks`: D, `bends`:
 * E), shape-2 and shape-3 kernels b2 e^{itz} / (1 - it/lambda)^2 + b3 e^{itz} / (1 - it/lambda)^3 beside it match them:
 * the three gamma densities' values at y = 0+ are (b lambda, 0, 0), slopes (-b, b2, 0) lambda^2 and second derivatives
 * (b, -2 b2, b3) lambda^3, so b2 = D / (w lambda^2) + b and b3 = E / (w lambda^3) - b + 2 b2, and the rest loses its
 * D e^{itz} / (-it)^2 and E e^{itz} / (-it)^3 terms too (decaying like t^-4 with both). The kernels are added back
 * exactly, so the sizes only affect how fast the rest decays. At most MAX_JUMP_KERNELS points, the largest weights first.
 */
export function jumpKernels(
  part: ContinuousPart,
  jumps: readonly { at: number; size: number }[],
  hi: number,
  kinks: readonly { at: number; size: number }[] = [],
  bends: readonly { at: number; size: number }[] = [],
): EndpointKernels[] {
  const w = part.weight;
  if (!(w > 0)) return [];
  const keep = (j: { at: number; size: number }) => j.at < hi && Number.isFinite(j.size) && j.size !== 0;
  const pts = new Map<number, [number, number, number]>();
  const put = (list: readonly { at: number; size: number }[], i: 0 | 1 | 2) => {
    for (const j of list.filter(keep)) {
      const e = pts.get(j.at) ?? [0, 0, 0];
      e[i] += j.size;
      pts.set(j.at, e);
    }
  };
  put(jumps, 0);
  put(kinks, 1);
  put(bends, 2);
  const orders = bends.length ? 3 : kinks.length ? 2 : 1;
  const out = [...pts].map(([at, [J, D, E]]) => {
    const rate = 60 / (hi - at);
    const b1 = J / w / rate;
    const b2 = D / w / (rate * rate) + b1;
    const b3 = E / w / (rate * rate * rate) - b1 + 2 * b2;
    const b = [b1, b2, b3].slice(0, orders);
    // the steps in density units (a jump, a slope step over the rate, ...), relative to the part's weight
    return { k: { at, side: 1 as const, rate, power: 1, b }, size: Math.max(Math.abs(J), Math.abs(D) / rate, Math.abs(E) / (rate * rate)) / w };
  });
  return out
    .filter((o) => o.size > 1e-16 && Number.isFinite(o.size))
    .sort((p, q) => q.size - p.size)
    .slice(0, MAX_JUMP_KERNELS)
    .map((o) => o.k);
}
