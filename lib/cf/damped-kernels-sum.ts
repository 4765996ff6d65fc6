// The gamma kernels' damped transforms at many frequencies, subtracted from psi with a per-node bound on their rounding.
import { kernelsMass, type GammaKernel } from "./damped-kernels";

const EPS = Number.EPSILON;
/** the largest integer shape and end multiple a kernel may have to be summed as a polynomial */
const MAX_POWER = 16;

/**
 * kernels of one rate whose shapes are integers 1..S and whose ends are lo + m base, m = 0..M, exactly in floating point
 * (a compound's n-claim ends n at): sum_k w_k z^shape E^m = sum_m E^m Q_m(z), z = rate / (rate + s), E = e^{-s base},
 * coefficients c[m (S + 1) + shape]
 */
interface PolyGroup {
  rate: number;
  base: number;
  M: number;
  S: number;
  c: Float64Array;
  abs: Float64Array;
}

interface KernelPlan {
  lo: number;
  groups: PolyGroup[];
  /** the rest, by rate then endpoint then shape, each by exp, cos and sin */
  rest: GammaKernel[];
}

function planKernels(ks: readonly GammaKernel[], lo: number): KernelPlan {
  const groups: PolyGroup[] = [];
  const rest: GammaKernel[] = [];
  const rates = [...new Set(ks.map((k) => k.rate))].sort((a, b) => a - b);
  for (const rate of rates) {
    const mine = ks.filter((k) => k.rate === rate);
    let base = Infinity;
    for (const k of mine) if (k.at - lo > 0) base = Math.min(base, k.at - lo);
    const fits = (k: GammaKernel) => {
      const d = k.at - lo;
      const m = d === 0 ? 0 : Math.round(d / base);
      return Number.isInteger(k.shape) && k.shape >= 1 && k.shape <= MAX_POWER && m >= 0 && m <= MAX_POWER && (m === 0 ? d === 0 : m * base === d);
    };
    const poly = mine.filter(fits);
    rest.push(...mine.filter((k) => !fits(k)));
    if (poly.length === 0) continue;
    const mOf = (k: GammaKernel) => (k.at - lo === 0 ? 0 : Math.round((k.at - lo) / base));
    const M = Math.max(...poly.map(mOf));
    const S = Math.max(...poly.map((k) => k.shape));
    const c = new Float64Array((M + 1) * (S + 1));
    // kernels of one end and shape are merged: their weights add (exactly enough: the sum's rounding is eps / 2 of it, and
    // the bound below takes the merged |c| times the allowance, plus that)
    for (const k of poly) c[mOf(k) * (S + 1) + k.shape] += k.w;
    const abs = c.map((x) => Math.abs(x) * (1 + EPS));
    groups.push({ rate, base: M > 0 ? base : 0, M, S, c, abs });
  }
  rest.sort((a, b) => a.rate - b.rate || a.at - b.at || a.shape - b.shape);
  return { lo, groups, rest };
}

const PLANS = new WeakMap<readonly GammaKernel[], KernelPlan>();

function planOf(ks: readonly GammaKernel[], lo: number) {
  let p = PLANS.get(ks);
  if (!p || p.lo !== lo) PLANS.set(ks, (p = planKernels(ks, lo)));
  return p;
}

/**
 * sum_k w_k e^{-s (at_k - lo)} (rate_k/(rate_k + s))^shape_k at s = beta - i t, subtracted from (re, im); with `noise`,
 * each node's rounding added to it. A polynomial group (PolyGroup) P = sum_m E^m Q_m(z) is summed by Horner's rule in z
 * within each end and in E across ends: one cos and sin per node. Its rounding: z and E are formed once, with relative
 * errors dz <= 4.5 eps (rectangular 1 / (1 + s / rate), 9 u per part) and dE <= 2.5 eps + (beta + t) base eps / 2 (exp, cos,
 * sin, a product, and the phase t base and damping beta base rounded by u of themselves), common to every term, so to
 * first order they move P by |z dP/dz| dz + |E dP/dE| dE, both summed alongside P (with the alternating weights of a
 * compound's kernels far below sum |c| |z|^shape |E|^m); each Horner step (a complex product, sqrt(2) gamma_2 = 1.42 eps,
 * Higham, Accuracy and Stability, lemma 3.5; a sum, u) is taken as 2 eps, so term (m, shape) takes 2 (shape + m) + 1/2 (its
 * merged weight) times |c| |z|^shape |E|^m eps; second-order terms are within 1e-6 of that. The other kernels by exp:
 * shape (2 |log |z|| + 5) + (t + beta) d + 3 per |w| |factor| (the log, atan2 and their inputs, the products by shape, the
 * phase and damping rounded by u of themselves, exp, cos and sin), 6 more per shape one above the last (z rectangular). Each subtraction from (re, im) rounds by eps / 2 per part.
 */
export function subtractKernels(ks: readonly GammaKernel[], lo: number, beta: number, t: Float64Array, re: Float64Array, im: Float64Array, noise?: Float64Array) {
  const plan = planOf(ks, lo);
  for (const g of plan.groups) subtractGroup(g, beta, t, re, im, noise);
  if (plan.rest.length > 0) subtractByExp(plan.rest, lo, beta, t, re, im, noise);
}

function subtractGroup(g: PolyGroup, beta: number, t: Float64Array, re: Float64Array, im: Float64Array, noise?: Float64Array) {
  const { rate, base, M, S, c, abs } = g;
  const S1 = S + 1;
  const damp = M > 0 ? Math.exp(-beta * base) : 1;
  const ur = 1 + beta / rate;
  const ur2 = ur * ur;
  // shape c (for z dP/dz) and |c| (2 shape + 2 m + 1/2) (the Horner steps' allowance) per term
  const sc = new Float64Array(c.length);
  const ops = new Float64Array(c.length);
  for (let m = 0; m <= M; m++)
    for (let s = 1; s <= S; s++) {
      sc[m * S1 + s] = s * c[m * S1 + s];
      ops[m * S1 + s] = abs[m * S1 + s] * (2 * s + 2 * m + 0.5);
    }
  const dE0 = 2.5 + 0.5 * beta * base;
  for (let j = 0; j < t.length; j++) {
    const tj = t[j];
    // z = 1 / (1 + s / rate), s = beta - i t
    const ui = -tj / rate;
    const d2 = ur2 + ui * ui;
    const zr = ur / d2;
    const zi = -ui / d2;
    let er = 1;
    let ei = 0;
    if (M > 0) {
      const ph = tj * base;
      er = damp * Math.cos(ph);
      ei = damp * Math.sin(ph);
    }
    const za = (1 + 4 * EPS) / Math.sqrt(d2);
    // P, z dP/dz and dP/dE by Horner in E (the derivative's rule: D <- D E + P_old), and the steps' allowance on |z|, |E|
    let ar = 0;
    let ai = 0;
    let zdr = 0;
    let zdi = 0;
    let der = 0;
    let dei = 0;
    let bound = 0;
    for (let m = M; m >= 0; m--) {
      let qr = 0;
      let qi = 0;
      let pr = 0;
      let pi = 0;
      let qa = 0;
      const row = m * S1;
      for (let s = S; s >= 1; s--) {
        const xr = qr + c[row + s];
        qr = xr * zr - qi * zi;
        qi = xr * zi + qi * zr;
        const yr = pr + sc[row + s];
        pr = yr * zr - pi * zi;
        pi = yr * zi + pi * zr;
        qa = (qa + ops[row + s]) * za;
      }
      if (m < M) {
        const nd = der * er - dei * ei + ar;
        dei = der * ei + dei * er + ai;
        der = nd;
        const nr = ar * er - ai * ei + qr;
        ai = ar * ei + ai * er + qi;
        ar = nr;
        const nz = zdr * er - zdi * ei + pr;
        zdi = zdr * ei + zdi * er + pi;
        zdr = nz;
      } else {
        ar = qr;
        ai = qi;
        zdr = pr;
        zdi = pi;
      }
      bound = bound * damp + qa;
    }
    const r = re[j] - ar;
    const i = im[j] - ai;
    re[j] = r;
    im[j] = i;
    if (noise) {
      // |E dP/dE| = |E| |dP/dE|, |E| = damp; moduli bounded by |re| + |im| (no square root, no underflow)
      const first = 4.5 * (Math.abs(zdr) + Math.abs(zdi)) + (dE0 + 0.5 * tj * base) * damp * (Math.abs(der) + Math.abs(dei));
      noise[j] += EPS * ((first + bound) * (1 + 1e-6) + 0.5 * (Math.abs(r) + Math.abs(i)));
    }
  }
}

function subtractByExp(ks: GammaKernel[], lo: number, beta: number, t: Float64Array, re: Float64Array, im: Float64Array, noise?: Float64Array) {
  for (let j = 0; j < t.length; j++) {
    let rate = NaN;
    let lzr = 0;
    let lzi = 0;
    let zr = 0;
    let zi = 0;
    let prev: GammaKernel | null = null;
    let pr = 0;
    let pi = 0;
    let rel = 0;
    let err = 0;
    let r = re[j];
    let i = im[j];
    for (const k of ks) {
      if (k.rate !== rate) {
        rate = k.rate;
        const ur = 1 + beta / rate;
        const ui = -t[j] / rate;
        const d2 = ur * ur + ui * ui;
        zr = ur / d2;
        zi = -ui / d2;
        lzr = -0.5 * Math.log(d2);
        lzi = -Math.atan2(ui, ur);
        prev = null;
      }
      const d = k.at - lo;
      if (prev && prev.at === k.at && Math.abs(k.shape - prev.shape - 1) < 1e-12) {
        // a shape one above the previous one at the same end: its factor times z
        const nr = pr * zr - pi * zi;
        pi = pr * zi + pi * zr;
        pr = nr;
        rel += 6;
      } else {
        const m = Math.exp(k.shape * lzr - beta * d);
        const a = k.shape * lzi + t[j] * d;
        pr = m * Math.cos(a);
        pi = m * Math.sin(a);
        rel = k.shape * (2 * Math.abs(lzr) + 5) + (t[j] + beta) * d + 3;
      }
      prev = k;
      r -= k.w * pr;
      i -= k.w * pi;
      err += Math.abs(k.w) * (Math.abs(pr) + Math.abs(pi)) * (rel + 0.5) + 0.5 * (Math.abs(r) + Math.abs(i));
    }
    re[j] = r;
    im[j] = i;
    if (noise) noise[j] += err * EPS * (1 + 1e-10);
  }
}

/**
 * a bound, at any t and beta >= 0, on what subtractKernels adds to `noise` (see there), for psi_c of size at most `size`
 * before the kernels are subtracted: |z| <= 1 and t |z|^shape <= rate for shape >= 1 (|z| <= rate / |t|), and
 * e^{-beta d} beta d <= 1/e; a shape below 1 away from lo has no such bound (t |z|^shape grows): Infinity
 */
export function kernelsRounding(ks: readonly GammaKernel[], lo: number, size: number): number {
  const plan = planOf(ks, lo);
  // each subtraction: eps / 2 of at most (size + the kernels' mass) per part, two parts
  let s = (plan.groups.length + plan.rest.length) * EPS * (size + kernelsMass(ks));
  for (const g of plan.groups)
    for (let m = 0; m <= g.M; m++)
      for (let sh = 1; sh <= g.S; sh++) s += g.abs[m * (g.S + 1) + sh] * EPS * (6.5 * sh + 4.5 * m + 1 + 0.5 / Math.E + 0.5 * m * g.base * g.rate);
  for (const k of plan.rest) {
    const d = Math.max(k.at - lo, 0);
    if (k.shape < 1 && d > 0) return Infinity;
    s += Math.abs(k.w) * EPS * (Math.max(k.shape, 1) * 16 + 21 + k.rate * d + 1 / Math.E);
  }
  return s * (1 + 1e-6);
}
