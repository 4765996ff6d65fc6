import { stableSide, type StableSide } from "./stable-kernel";
import type { StableIntegrals } from "./stable-integral";
import { stablePanels, stableWindowPanels } from "./stable-panels";
import { sinRange, type Box, type PanelSide } from "./stable-panel-store";
import { oneTightBox } from "./stable-box";
import { stableLightPanels } from "./stable-light";

const HALF_PI = Math.PI / 2;

/**
 * The integrals I0, I1, Ip of the stable representation (./stable-integral.ts) for alpha = 1 far out in either tail,
 * where the grid of ./stable-integral.ts would need ever more nodes far from any stored window.
 *
 * In the form I0 = int Theta_low(w) K(lh + w) dw, I1 = int Theta_high(w) K(lh + w) dw, Ip = int Theta_low'(w) K(lh + w) dw
 * (K(v) = exp(v - e^v), the density of log E for E standard exponential), the kernel sits at w = -lh with a width of
 * a few units, while far out Theta(w) (the distance of the solution of log V(theta) = w to the end of the theta
 * interval) behaves like c / |w| and varies on the scale |w|. A Gauss rule for the weight K then integrates each
 * of them with a few solves of log V = w instead of a march over the whole kernel (Gautschi 2004, Orthogonal
 * Polynomials: Computation and Approximation, sec. 2.2: the discretised Stieltjes procedure; Golub & Welsch 1969 for
 * nodes and Christoffel weights from the Jacobi matrix). The rule's nodes are computed here once, from a trapezoid
 * discretisation of K (exponentially accurate for this analytic, doubly decaying weight).
 *
 * Error estimate: the difference between the rules of N_HI and N_LO nodes (the lower rule's error dominates it),
 * times 10, plus the effect of each node's residual in log V, plus the rounding of the sums. The caller falls back
 * to the grid when the estimate is above 1e-10 of the value. The estimate is never reported as a bound: far out the
 * tail series (./stable-one-tail.ts) answers, and where this rule's value is taken ./stable.ts bounds it by its
 * distance to panels with derived bounds (derivedBound).
 */

/** node counts of the two rules; far out the error of the N-node rule falls like (width / |w|)^(2N) */
const N_HI = 10;
const N_LO = 7;
/** |w0| from which the far rule is tried (the grid serves nearer windows) */
export const FAR_W = 60;

export interface Rule {
  v: Float64Array;
  W: Float64Array;
}

/** Gauss rule of n nodes for the weight K(v) = exp(v - e^v) on the real line. */
export function gumbelGaussRule(n: number): Rule {
  // discretised weight: trapezoid on [-80, 6] (K < 1e-34 beyond), step 1/64
  const h = 1 / 64;
  const lo = -80;
  const N = Math.round(86 / h) + 1;
  const xs = new Float64Array(N);
  const ws = new Float64Array(N);
  for (let i = 0; i < N; i++) {
    const v = lo + i * h;
    xs[i] = v;
    ws[i] = h * Math.exp(v - Math.exp(v));
  }
  // Stieltjes: p_{k+1} = (v - a_k) p_k - b_k p_{k-1}, with the discrete inner product
  const a = new Float64Array(n);
  const b = new Float64Array(n);
  let p0 = new Float64Array(N);
  let p1 = new Float64Array(N).fill(1);
  let normPrev = 1;
  for (let k = 0; k < n; k++) {
    let nrm = 0;
    let vm = 0;
    for (let i = 0; i < N; i++) {
      const q = ws[i] * p1[i] * p1[i];
      nrm += q;
      vm += q * xs[i];
    }
    a[k] = vm / nrm;
    b[k] = k === 0 ? nrm : nrm / normPrev;
    normPrev = nrm;
    const p2 = new Float64Array(N);
    for (let i = 0; i < N; i++) p2[i] = (xs[i] - a[k]) * p1[i] - (k === 0 ? 0 : b[k] * p0[i]);
    p0 = p1;
    p1 = p2;
  }
  // nodes: eigenvalues of the Jacobi matrix (diagonal a, off-diagonal sqrt(b_k), k >= 1) by Sturm-sequence bisection
  const off = new Float64Array(n);
  for (let k = 1; k < n; k++) off[k] = Math.sqrt(b[k]);
  let gLo = Infinity;
  let gHi = -Infinity;
  for (let k = 0; k < n; k++) {
    const r = (k > 0 ? off[k] : 0) + (k + 1 < n ? off[k + 1] : 0);
    gLo = Math.min(gLo, a[k] - r);
    gHi = Math.max(gHi, a[k] + r);
  }
  const below = (x: number): number => {
    // number of eigenvalues below x (signs of the LDL^T pivots of J - x)
    let c = 0;
    let d = 1;
    for (let k = 0; k < n; k++) {
      d = a[k] - x - (k > 0 ? (off[k] * off[k]) / d : 0);
      if (d === 0) d = -1e-300;
      if (d < 0) c++;
    }
    return c;
  };
  const v = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    let l = gLo;
    let r = gHi;
    for (let it = 0; it < 200 && r - l > 1e-15 * Math.max(1, Math.abs(l) + Math.abs(r)); it++) {
      const m = 0.5 * (l + r);
      if (below(m) > j) r = m;
      else l = m;
    }
    v[j] = 0.5 * (l + r);
  }
  // Christoffel weights 1 / sum_k phat_k(v)^2 with the orthonormal polynomials phat_k
  const W = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    let q0 = 0;
    let q1 = 1 / Math.sqrt(b[0]);
    let s = q1 * q1;
    for (let k = 0; k + 1 < n; k++) {
      const q2 = ((v[j] - a[k]) * q1 - (k > 0 ? off[k] * q0 : 0)) / off[k + 1];
      q0 = q1;
      q1 = q2;
      s += q1 * q1;
    }
    W[j] = 1 / s;
  }
  return { v, W };
}

let rules: { hi: Rule; lo: Rule } | null = null;
/** the N_HI- and N_LO-node rules for the weight K (computed once) */
export function theRules(): { hi: Rule; lo: Rule } {
  if (!rules) rules = { hi: gumbelGaussRule(N_HI), lo: gumbelGaussRule(N_LO) };
  return rules;
}

const sides = new Map<number, StableSide>();
function sideFor(beta: number): StableSide {
  let s = sides.get(beta);
  if (!s) {
    if (sides.size > 64) sides.clear();
    s = stableSide(1, beta);
    sides.set(beta, s);
  }
  return s;
}


/**
 * Bounds on log V over a rectangle [x1, x2] x [-Y, Y] of u (alpha = 1, u from the low end when from = 0, the high end
 * when from = 1): log V = log(2/pi) + log P - log sin u + s P cot(u) / beta, with P = pi/2 (1 - beta) + beta u, s = -1
 * (low end) or P = pi/2 (1 + beta) - beta u, s = 1 (high end). For u = x + iy with x in (0, pi):
 *   |P| in [Re P, |P|], |arg P| <= atan(beta Y / Re P);  |sin u|^2 = sin^2 x + sinh^2 y,  |arg sin u| = atan(|cot x| tanh |y|);
 *   cot u = (sin 2x - i sinh 2y) / (cosh 2y - cos 2x) (Abramowitz & Stegun 4.3.58), cosh 2y - cos 2x = 2 (sin^2 x + sinh^2 y),
 *   and P cot u by the product of ranges.
 */
export function oneBox(beta: number): PanelSide["box"] {
  const lg = Math.log(2 / Math.PI);
  return (from, x1, x2, Y, out: Box) => {
    if (!(x1 > 0 && x2 < Math.PI && Y > 0)) return false;
    const sg = from === 0 ? -1 : 1;
    const P0 = from === 0 ? HALF_PI * (1 - beta) : HALF_PI * (1 + beta);
    const pa = P0 - sg * beta * x1;
    const pb = P0 - sg * beta * x2;
    const prLo = Math.min(pa, pb);
    const prHi = Math.max(pa, pb);
    if (!(prLo > 0)) return false;
    const pi = beta * Y;
    const [sLo, sHi] = sinRange(x1, x2);
    if (!(sLo > 0)) return false;
    const sh = Math.sinh(Y);
    const cotMax = Math.max(Math.abs(1 / Math.tan(x1)), Math.abs(1 / Math.tan(x2)));
    // cosh 2y - cos 2x = 2 (sin^2 x + sinh^2 y), without the cancellation of 1 - cos 2x at small x
    const denLo = 2 * sLo * sLo;
    const denHi = 2 * (sHi * sHi + sh * sh);
    if (!(denLo > 0)) return false;
    const [nLo, nHi] = sinRange(2 * x1, 2 * x2);
    const crLo = nLo / (nLo >= 0 ? denHi : denLo);
    const crHi = nHi / (nHi >= 0 ? denLo : denHi);
    const ciMax = Math.sinh(2 * Y) / denLo;
    const prods = [prLo * crLo, prLo * crHi, prHi * crLo, prHi * crHi];
    const cross = pi * ciMax;
    const reTLo = (Math.min(...prods) - cross) / beta;
    const reTHi = (Math.max(...prods) + cross) / beta;
    const imT = (prHi * ciMax + pi * Math.max(Math.abs(crLo), Math.abs(crHi))) / beta;
    const lpLo = Math.log(prLo);
    const lpHi = 0.5 * Math.log(prHi * prHi + pi * pi);
    const lsLo = Math.log(sLo);
    const lsHi = 0.5 * Math.log(sHi * sHi + sh * sh);
    const lo = lg + lpLo - lsHi + (sg > 0 ? reTLo : -reTHi);
    const hi = lg + lpHi - lsLo + (sg > 0 ? reTHi : -reTLo);
    // the bounds' own rounding: a few eps of the magnitudes summed
    const r = 16 * Number.EPSILON * (Math.abs(lg) + Math.abs(lpLo) + Math.abs(lpHi) + Math.abs(lsLo) + Math.abs(lsHi) + Math.abs(reTLo) + Math.abs(reTHi));
    out.rLo = lo - r;
    out.rHi = hi + r;
    out.iMax = (Math.atan(pi / prLo) + Math.atan(cotMax * Math.tanh(Y)) + imT) * (1 + 16 * Number.EPSILON);
    return true;
  };
}

const panelSides = new Map<number, PanelSide>();
function panelSideFor(beta: number): PanelSide {
  let p = panelSides.get(beta);
  if (!p) {
    if (panelSides.size > 64) panelSides.clear();
    p = { side: sideFor(beta), box: oneTightBox(beta, oneBox(beta)) };
    panelSides.set(beta, p);
  }
  return p;
}

interface Solved {
  /** distance to the end on the kernel's side */
  u: number;
  /** d Theta / d w = 1 / |d log V / d u| */
  dth: number;
  /** bound on the error of u from the residual and rounding of log V */
  eu: number;
}

/**
 * Solve log V - wRef = T for the distance u to the end (from = 0 low, 1 high) by Newton in s = 1/u, where log V is
 * close to linear far out; c is the slope of log V in s at the end, for the first guess.
 */
function solveFar(side: StableSide, from: 0 | 1, T: number, c: number, out: Solved): boolean {
  const o = { lv: 0, d: 0, mag: 0 };
  const sMin = 1 / side.L;
  let s = Math.max(Math.abs(T) / c, 2 / side.L);
  for (let it = 0; it < 60; it++) {
    const u = 1 / s;
    side.logV(from, u, o);
    const g = o.lv - T;
    const tol = 4 * Number.EPSILON * (o.mag + Math.abs(T));
    if (Math.abs(g) <= tol) {
      out.u = u;
      out.dth = 1 / Math.abs(o.d);
      out.eu = (Math.abs(g) + 2 * tol) / Math.abs(o.d) + 2 * Number.EPSILON * u;
      return true;
    }
    const dlds = -o.d * u * u;
    let sn = s - g / dlds;
    if (!Number.isFinite(sn)) return false;
    // keep u inside the interval: halve the way to its far end instead of stepping past it
    if (!(sn > sMin)) sn = 0.5 * (s + sMin);
    if (Math.abs(sn - s) <= 1e-15 * s) {
      side.logV(from, 1 / sn, o);
      out.u = 1 / sn;
      out.dth = 1 / Math.abs(o.d);
      out.eu = (Math.abs(o.lv - T) + 2 * tol) / Math.abs(o.d) + 2 * Number.EPSILON * out.u;
      return Math.abs(o.lv - T) <= 1e3 * tol;
    }
    s = sn;
  }
  return false;
}

/**
 * Far-tail integrals of the alpha = 1 side with beta in (0, 1] at log h = lhAbs, or null when the window is not far
 * enough out (|log h| below FAR_W, the light end of beta = 1) or the two rules disagree by more than 1e-11 relative.
 * Small beta makes log V steep in theta everywhere (slope ~ 1/beta), so Theta is smooth on the kernel's scale even
 * where a node's solution lies in the middle of the interval; each node is solved from the end nearer to it.
 */
export function stableOneFar(beta: number, lhAbs: number): StableIntegrals | null {
  if (!(beta > 0 && beta <= 1)) return null;
  const side = sideFor(beta);
  const lh = lhAbs + side.wRef;
  const w0 = -lh;
  if (!(Math.abs(w0) >= FAR_W)) return null;
  // near the high end (theta -> pi/2) log V ~ (pi/2)(1 + beta) / (beta u), near the low end (theta -> -pi/2)
  // log V ~ -(pi/2)(1 - beta) / (beta u); beta = 1 has a finite low end (no far window below the body there)
  if (w0 < 0 && beta === 1) return null;
  const cHigh = (HALF_PI * (1 + beta)) / beta;
  const cLow = (HALF_PI * (1 - beta)) / beta;
  const L = side.L;
  const { hi, lo } = theRules();
  const sol: Solved = { u: 0, dth: 0, eu: 0 };
  const sum = (r: Rule, acc: Acc): boolean => {
    acc.tl = acc.th = acc.p = acc.et = acc.ep = 0;
    acc.fromHigh = acc.fromLow = false;
    for (let i = 0; i < r.v.length; i++) {
      const T = w0 + r.v[i];
      const from: 0 | 1 = T > side.wMid ? 1 : 0;
      if (from === 0 && beta === 1) return false;
      if (!solveFar(side, from, T, from === 1 ? cHigh : cLow, sol)) return false;
      // the distance to the nearer end directly, the other as L minus it
      const tl = from === 0 ? sol.u : L - sol.u;
      const th = from === 1 ? sol.u : L - sol.u;
      if (from === 1) acc.fromHigh = true;
      else acc.fromLow = true;
      acc.tl += r.W[i] * tl;
      acc.th += r.W[i] * th;
      acc.p += r.W[i] * sol.dth;
      acc.et += r.W[i] * sol.eu;
      // the node's error in w moves Theta' by about Theta'' dw, Theta'' ~ 2 Theta' / |w| far out
      acc.ep += r.W[i] * sol.dth * (2 * (sol.eu / sol.dth) / Math.max(1, Math.abs(T)) + 4 * Number.EPSILON);
    }
    return true;
  };
  const A: Acc = { tl: 0, th: 0, p: 0, et: 0, ep: 0, fromHigh: false, fromLow: false };
  const B: Acc = { tl: 0, th: 0, p: 0, et: 0, ep: 0, fromHigh: false, fromLow: false };
  if (!sum(hi, A) || !sum(lo, B)) return null;
  // the kernel's mass beyond the body (where the rule's polynomial model of Theta is not meant to hold) is below
  // exp(-|w0| + 5)
  const outside = L * Math.exp(-Math.abs(w0) + 5);
  const round = 8 * Number.EPSILON;
  const eLow = 10 * Math.abs(A.tl - B.tl) + A.et + round * A.tl + outside + (A.fromHigh ? 4 * Number.EPSILON * L : 0);
  const eHigh = 10 * Math.abs(A.th - B.th) + A.et + round * A.th + outside + (A.fromLow ? 4 * Number.EPSILON * L : 0);
  const ep = 10 * Math.abs(A.p - B.p) + A.ep + round * A.p + outside;
  if (!(eLow <= 1e-11 * A.tl && eHigh <= 1e-11 * A.th && ep <= 1e-11 * A.p)) return null;
  const res: StableIntegrals = { I0: A.tl, I1: A.th, Ip: A.p, e0: eLow, e1: eHigh, ep, nodes: N_HI + N_LO };
  if (side.wLowEnd > -Infinity) {
    // beta = 1 (w0 > 0): the finite low end leaves L (1 - exp(-h V_end)) in I1 (h V_end = e^lh, tiny here)
    res.I1 = A.th - L * Math.expm1(-Math.exp(lh));
    res.I0 = L - res.I1;
    res.e0 = eHigh + 4 * Number.EPSILON * L;
  }
  return res;
}

interface Acc {
  tl: number;
  th: number;
  p: number;
  et: number;
  ep: number;
  fromHigh: boolean;
  fromLow: boolean;
}

/** I0, I1, Ip of the alpha = 1 side with beta in (0, 1] at log h = lhAbs by Gauss-Legendre panels in theta with derived bounds (./stable-panels.ts). */
export function stableOnePanels(beta: number, lhAbs: number, rel = 1e-11, dl = 0): StableIntegrals | null {
  if (!(beta > 0 && beta <= 1)) return null;
  return stablePanels(panelSideFor(beta), lhAbs, rel, dl);
}

/** The same with panels of the point's own placed at its window (./stable-panels.ts stableWindowPanels); bounds derived, whatever their size. */
export function stableOneWindow(beta: number, lhAbs: number, dl = 0): StableIntegrals | null {
  if (!(beta > 0 && beta <= 1)) return null;
  return stableWindowPanels(panelSideFor(beta), lhAbs, dl);
}

/** beta = 1 on its light side far out, by ./stable-light.ts (null where it does not apply or cannot place its panels) */
export function stableOneLight(lhAbs: number, dl = 0): StableIntegrals | null {
  return stableLightPanels(panelSideFor(1), lhAbs, dl);
}
