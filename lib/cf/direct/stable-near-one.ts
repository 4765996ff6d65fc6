import { theRules, type Rule } from "./stable-far";
import type { StableIntegrals } from "./stable-integral";
import { stableSide, type StableSide } from "./stable-kernel";

/**
 * The integrals I0, I1, Ip of the stable representation (./stable-integral.ts) for alpha next to 1 (alpha != 1), by
 * the Gauss rule for the weight K(v) = exp(v - e^v) of ./stable-far.ts instead of the march over the node grid.
 *
 * log V(theta) is (1/(alpha - 1)) times a function of theta plus terms of order 1, so its inverse Theta(w) (the
 * distance of the solution of log V = w to either end of the theta interval) is a smooth function of (alpha - 1) w:
 * near the ends log V ~ c log u / (alpha - 1), so Theta ~ exp((alpha - 1) w / c), and in between it varies on the
 * scale 1 / |alpha - 1| of w. Next to 1 that scale is far wider than the kernel (a few units), so in
 * I0 = int Theta_low(w0 + v) K(v) dv, I1 = int Theta_high(w0 + v) K(v) dv, Ip = int Theta'(w0 + v) K(v) dv
 * (w0 = -log h) a few solves of log V = w replace the grid; its set-up for alpha next to 1 (log h spreads over
 * thousands of units, one node every quarter unit) took most of a second.
 *
 * Error estimate: the difference between the rules of 10 and 7 nodes (the lower rule's error dominates it), times 10,
 * plus the effect of each node's residual in log V and the rounding of the sums. The caller falls back to the grid
 * when the estimate is above 1e-11 of a value. The estimate is never reported as a bound: ./stable.ts takes this
 * rule's value only where the panels' derived bound is loose, and bounds it by its distance to them (derivedBound).
 */

/** the rule is tried for |alpha - 1| up to this (the scale 1/|alpha - 1| of Theta is then >= 20 kernel widths) */
export const NEAR_ONE = 0.02;

const sides = new Map<string, StableSide>();
function sideFor(alpha: number, beta: number): StableSide {
  const key = `${alpha}:${beta}`;
  let s = sides.get(key);
  if (!s) {
    if (sides.size > 64) sides.clear();
    s = stableSide(alpha, beta);
    sides.set(key, s);
  }
  return s;
}

interface Solved {
  /** distance to the end solved from */
  u: number;
  /** d theta / d w = 1 / |d log V / d u| */
  dth: number;
  /** bound on the error of u from the residual and rounding of log V */
  eu: number;
}

/**
 * Solve log V - wRef = T for the distance u to the end `from` by bracketed Newton in t = log u (log V is close to
 * linear in log u near either end when alpha != 1); false when no solution lies farther than e^-740 from the end.
 */
function solveLogV(side: StableSide, from: 0 | 1, T: number, out: Solved, start: number): boolean {
  const o = { lv: 0, d: 0, mag: 0 };
  const sgn = from === 0 ? 1 : -1;
  let tA = -740;
  let tB = Math.log(side.L);
  side.logV(from, Math.exp(tA), o);
  if (sgn * (o.lv - T) >= 0) return false;
  let t = start > tA && start < tB ? start : Math.log(side.L / 2);
  let gPrev = Infinity;
  for (let it = 0; it < 200; it++) {
    const u = Math.exp(t);
    side.logV(from, u, o);
    const g = sgn * (o.lv - T);
    const tol = 4 * Number.EPSILON * (o.mag + Math.abs(T));
    if (Math.abs(g) <= tol || tB - tA < 1e-15 * Math.max(1, Math.abs(t))) {
      out.u = u;
      out.dth = 1 / Math.abs(o.d);
      out.eu = (Math.abs(g) + 2 * tol) / Math.abs(o.d) + 2 * Number.EPSILON * u;
      return Math.abs(g) <= 1e3 * tol;
    }
    if (g > 0) tB = t;
    else tA = t;
    let tn = t - g / (sgn * o.d * u);
    const slow = Math.abs(g) > 0.5 * gPrev;
    gPrev = Math.abs(g);
    if (slow || !(tn > tA && tn < tB) || !Number.isFinite(tn)) tn = 0.5 * (tA + tB);
    t = tn;
  }
  return false;
}

interface Acc {
  tl: number;
  th: number;
  p: number;
  /** error sums of tl and th */
  el: number;
  eh: number;
  ep: number;
}

function sumRule(side: StableSide, r: Rule, w0: number, acc: Acc, sol: Solved): boolean {
  acc.tl = acc.th = acc.p = acc.el = acc.eh = acc.ep = 0;
  const L = side.L;
  // the nodes are solved in increasing order: each starts from its neighbour's solution on the same end
  const start = [NaN, NaN];
  for (let i = 0; i < r.v.length; i++) {
    const T = w0 + r.v[i];
    const from: 0 | 1 = T <= side.wMid ? 0 : 1;
    if (!solveLogV(side, from, T, sol, start[from])) return false;
    start[from] = Math.log(sol.u);
    const tl = from === 0 ? sol.u : L - sol.u;
    const th = from === 1 ? sol.u : L - sol.u;
    acc.tl += r.W[i] * tl;
    acc.th += r.W[i] * th;
    acc.p += r.W[i] * sol.dth;
    // each node's error in u, plus the rounding of L - u for the end not solved from
    acc.el += r.W[i] * (sol.eu + (from === 1 ? 2 * Number.EPSILON * L : 0));
    acc.eh += r.W[i] * (sol.eu + (from === 0 ? 2 * Number.EPSILON * L : 0));
    // the node's error moves Theta' by about Theta'' du / Theta', |Theta''| <= |Theta'| |alpha - 1| far from the ends
    acc.ep += r.W[i] * sol.dth * (sol.eu / Math.max(sol.u, 1e-300) + 4 * Number.EPSILON);
  }
  return true;
}

/**
 * I0, I1, Ip of the side (alpha, beta) at log h = lhAbs by the Gauss rule, or null when alpha is not next to 1, the
 * kernel reaches a finite end of log V, a node cannot be solved, or the two rules disagree by more than 1e-11.
 */
export function stableNearOne(alpha: number, beta: number, lhAbs: number): StableIntegrals | null {
  if (!(alpha !== 1 && Math.abs(alpha - 1) <= NEAR_ONE)) return null;
  const side = sideFor(alpha, beta);
  const L = side.L;
  if (!(L > 0)) return null;
  const lh = lhAbs + side.wRef;
  const w0 = -lh;
  const bounded = Number.isFinite(side.wLowEnd);
  // Theta has a square-root end at a finite low end of log V (w = 0 here): the kernel must stay clear of it
  if (bounded && !(w0 >= 60)) return null;
  const { hi, lo } = theRules();
  const sol: Solved = { u: 0, dth: 0, eu: 0 };
  const A: Acc = { tl: 0, th: 0, p: 0, el: 0, eh: 0, ep: 0 };
  const B: Acc = { tl: 0, th: 0, p: 0, el: 0, eh: 0, ep: 0 };
  if (!sumRule(side, hi, w0, A, sol) || !sumRule(side, lo, w0, B, sol)) return null;
  const round = 8 * Number.EPSILON;
  // beyond a finite end the kernel's mass is below exp(-w0) (K(v) <= e^v)
  const outside = bounded ? L * Math.exp(-w0) : 0;
  const e0 = 10 * Math.abs(A.tl - B.tl) + A.el + round * A.tl + outside;
  const e1 = 10 * Math.abs(A.th - B.th) + A.eh + round * A.th + outside;
  const ep = 10 * Math.abs(A.p - B.p) + A.ep + round * A.p + outside;
  if (!(e0 <= 1e-11 * A.tl && e1 <= 1e-11 * A.th && ep <= 1e-11 * A.p)) return null;
  const res: StableIntegrals = { I0: A.tl, I1: A.th, Ip: A.p, e0, e1, ep, nodes: hi.v.length + lo.v.length };
  if (bounded) {
    // the finite low end leaves L (1 - exp(-h V_end)) in I1 (h V_end = e^lh, tiny here)
    res.I1 = A.th - L * Math.expm1(-Math.exp(lh));
    res.I0 = L - res.I1;
    res.e0 = e1 + 4 * Number.EPSILON * L;
  }
  return res;
}
