import { yAtW } from "./stable-kernel";
import { DY, TAIL_TERMS, gridFor, type Row } from "./stable-grid";

/**
 * The three integrals of the stable representation at one point, with h = exp(lh):
 *   I0 = int exp(-h V) dtheta,  I1 = int (1 - exp(-h V)) dtheta,  Ip = int h V exp(-h V) dtheta.
 * Integrated by parts in w = log V (monotone in theta; Theta_low(w) = measure{log V < w}, Theta_high = L - Theta_low):
 *   I0 = int Theta_low(w) K(lh + w) dw,   I1 = int Theta_high(w) K(lh + w) dw [+ L (1 - exp(-h V_end)) when log V
 *   has a finite lower end],   Ip = int K(lh + w(theta)) dtheta,
 * with K(v) = exp(v - e^v) (the density of log E, E standard exponential): the integrands decay at both ends for
 * every h and I1 never forms 1 - exp(-hV) by subtraction. Each is a trapezoid sum on a uniform grid in
 * y = w + log(Theta_low / Theta_high), exponentially convergent for integrands analytic in a strip (Trefethen &
 * Weideman 2014, SIAM Review 56(3), sec. 5). Error estimate: the difference to the sum on every second node,
 * plus rigorous bounds on the parts left out, plus the effect of each node's error in w. Never reported as a bound:
 * ./stable.ts takes the grid's value only where the panels' derived bound is loose and bounds it by comparison.
 *
 * The far left of the kernel (v = log h + w below V_TAIL, where K(v) = sum_k (-1)^k e^{(k+1) v} / k! converges fast)
 * is summed from prefix sums of the stored grid: sum_{i <= j} c_i e^{m v_i} = e^{m v_j} sum_{i <= j} c_i e^{m (w_i - w_j)},
 * the last factor stored per node for m = 1..TAIL_TERMS, so each point marches only over the kernel's bulk. The sums
 * are the same trapezoid sums (also the every-second-node sum of the error estimate), up to the omitted terms, which
 * are bounded and added to the error.
 */
export interface StableIntegrals {
  I0: number;
  I1: number;
  Ip: number;
  e0: number;
  e1: number;
  ep: number;
  nodes: number;
}

/** parts left out are bounded below this fraction of the sum so far (their bound joins the error estimate) */
const REL = 1e-13;
/** nodes stored left and right of the kernel's centre for each point (the marches extend the store when short) */
const WINDOW_LEFT = 200;
const WINDOW_RIGHT = 64;
/** below this v the left tail comes from the prefix sums; e^V_TAIL = 2.5e-3 */
const V_TAIL = -6;

function kernel(v: number): number {
  return Math.exp(v - Math.exp(v));
}

/** Integrals I0, I1, Ip of the side (alpha, beta) at log h = lhAbs. */
export function stableIntegrals(alpha: number, beta: number, lhAbs: number): StableIntegrals {
  const g = gridFor(alpha, beta);
  const side = g.side;
  const L = side.L;
  const out: StableIntegrals = { I0: 0, I1: 0, Ip: 0, e0: 0, e1: 0, ep: 0, nodes: 0 };
  if (!(L > 0)) return out;
  // grid values are log V - wRef
  const lh = lhAbs + side.wRef;
  const bounded = Number.isFinite(side.wLowEnd);
  const vEnd = bounded ? lh : -Infinity; // v at the finite end (w = 0 there)
  const eEnd = Math.exp(vEnd);
  // start where v = 0, or at the finite end when all of log V lies above -lh
  let yStart = NaN;
  const n = g.n;
  if (n > 2 && !Number.isNaN(g.tl[0]) && !Number.isNaN(g.tl[n - 1]) && g.w[0] <= -lh && -lh <= g.w[n - 1]) {
    // w is increasing along the stored grid: bisect for the node nearest to v = 0
    let a = 0;
    let b = n - 1;
    while (b - a > 1) {
      const m = (a + b) >> 1;
      if (g.w[m] <= -lh) a = m;
      else b = m;
    }
    yStart = (g.lo + a) * DY;
  } else yStart = yAtW(side, -lh, g.yHint);
  if (Number.isNaN(yStart)) yStart = -lh <= side.wMid ? -Infinity : Infinity;
  let jStart = Number.isFinite(yStart) ? Math.round(yStart / DY) : yStart < 0 ? Math.round((side.wMid - 200) / DY) : Math.round((side.wMid + 200) / DY);
  if (!Number.isFinite(yStart) && yStart < 0 && bounded) {
    // find the first existing node near the end
    jStart = Math.round(-40 / DY);
  }
  // the window the marches usually need: v down to about -40 (prefix sums and the left remainder), up to about +4
  g.ensure(jStart - WINDOW_LEFT, jStart + WINDOW_RIGHT);
  const r: Row = { w: 0, tl: 0, th: 0, ww: 0, wt: 0, res: 0 };
  let A0 = 0, A1 = 0, Ap = 0, B0 = 0, B1 = 0, Bp = 0, P0 = 0, P1 = 0, Pp = 0;
  // the sums A are compensated (TwoSum: Ogita, Rump & Oishi 2005, SIAM J. Sci. Comput. 26(6), Algorithm 4.4 "Sum2"):
  // C collects each addition's exact rounding error, and the result A + C is off by at most u |A + C| plus
  // gamma_{n-1}^2 times the sum of the (positive) terms, Proposition 4.5; `added` counts the terms, R the rounding of
  // the prefix-sum part
  let C0 = 0, C1 = 0, Cp = 0;
  let added = 0;
  let R0 = 0, R1 = 0, Rp = 0;
  // e^v and K(v) of the last node added
  let sLast = 0;
  let kLast = 0;
  const add = (j: number): number => {
    const v = lh + r.w;
    const s = Math.exp(v);
    // K = exp(v - e^v) without forming e^v e^{-e^v} (which is Inf * 0 when e^v overflows)
    const K = Math.exp(v - s);
    sLast = s;
    kLast = K;
    if (K === 0) {
      out.nodes++;
      return v;
    }
    const wk = r.ww * K;
    const a0 = wk * r.tl;
    const a1 = wk * r.th;
    const ap = r.wt * K;
    let t = A0 + a0;
    let z = t - A0;
    C0 += A0 - (t - z) + (a0 - z);
    A0 = t;
    t = A1 + a1;
    z = t - A1;
    C1 += A1 - (t - z) + (a1 - z);
    A1 = t;
    t = Ap + ap;
    z = t - Ap;
    Cp += Ap - (t - z) + (ap - z);
    Ap = t;
    if ((j & 1) === 0) {
      B0 += 2 * a0;
      B1 += 2 * a1;
      Bp += 2 * ap;
    }
    // a shift dv of the node's v changes K by K (1 - s) dv; the rounding of v - e^v (eps (|v| + s) absolute), of exp
    // and of the two products adds eps (|v| + s + 4) relative
    const q = Math.abs(1 - s) * (4 * Number.EPSILON * Math.abs(r.w) + r.res) + Number.EPSILON * (Math.abs(v) + s + 4);
    added++;
    P0 += a0 * q;
    P1 += a1 * q;
    Pp += ap * q;
    out.nodes++;
    return v;
  };
  // march right (v increasing)
  let r0 = 0, r1 = 0, rp = 0;
  for (let j = jStart; ; j++) {
    if (!g.row(j, r)) break; // at the high end: nothing is left out
    const v = add(j);
    const ex = Math.exp(-sLast);
    r0 = L * ex;
    r1 = r.th * ex;
    rp = (v > 0 ? kLast : 1 / Math.E) * r.th;
    if (v > 0 && r0 <= REL * A0 && r1 <= REL * A1 && rp <= REL * Ap) break;
    if (ex === 0) {
      r0 = r1 = rp = 0;
      break;
    }
  }
  // march left (v decreasing); far left, the stored grid's prefix sums give the rest of the sums at once
  let l0 = 0, l1 = 0, lp = 0;
  let T0 = 0, T1 = 0, Tp = 0;
  const leftRemainder = (v: number) => {
    // with a finite end: exp(-h V_end) (1 - exp(-(h V - h V_end))), 0 when exp(-h V_end) underflows (Inf - Inf is NaN)
    const fEnd = bounded ? Math.exp(-eEnd) : 1;
    const below = bounded ? (fEnd === 0 ? 0 : fEnd * -Math.expm1(-(sLast - eEnd))) : -Math.expm1(-sLast);
    const kLeft = v <= 0 ? kLast : bounded && vEnd > 0 ? kernel(vEnd) : 1 / Math.E;
    l0 = r.tl * below;
    l1 = L * below;
    lp = kLeft * r.tl;
  };
  for (let j = jStart - 1; ; j--) {
    if (!g.row(j, r)) {
      l0 = l1 = lp = 0;
      break;
    }
    const vj = lh + r.w;
    const i = j - g.lo;
    if (vj <= V_TAIL && i >= 0 && i < g.n) {
      g.prefix();
      // sum over the stored nodes k <= j of c_t(k) K(v_k), K(v) = sum_{m >= 1} (-1)^(m-1) e^{m v} / (m-1)!
      const x = Math.exp(vj);
      let xm = 1;
      let fact = 1;
      let S0 = 0, S1 = 0, Sp = 0, D0 = 0, D1 = 0, Dp = 0;
      // each stored prefix sum is a sum of positive terms, each carried through at most (i - iFirst + 1) steps of
      // acc * f + c with f = e1^m: (m + 3) eps relative per step; the sum over m adds 3 m + 3 eps per term
      const steps = i - g.iFirst + 1;
      for (let m = 1; m <= TAIL_TERMS; m++) {
        xm *= x;
        if (m > 1) fact *= m - 1;
        const cm = ((m & 1 ? 1 : -1) * xm) / fact;
        const k = 3 * (m - 1);
        const rel = Number.EPSILON * (steps * (m + 3) + 3 * m + 3);
        R0 += Math.abs(cm) * g.pre[k][i] * rel;
        R1 += Math.abs(cm) * g.pre[k + 1][i] * rel;
        Rp += Math.abs(cm) * g.pre[k + 2][i] * rel;
        S0 += cm * g.pre[k][i];
        S1 += cm * g.pre[k + 1][i];
        Sp += cm * g.pre[k + 2][i];
        D0 += cm * g.alt[k][i];
        D1 += cm * g.alt[k + 1][i];
        Dp += cm * g.alt[k + 2][i];
      }
      A0 += S0;
      A1 += S1;
      Ap += Sp;
      // (added plainly: its rounding, eps/2 of the new A, joins R)
      R0 += 0.5 * Number.EPSILON * A0;
      R1 += 0.5 * Number.EPSILON * A1;
      Rp += 0.5 * Number.EPSILON * Ap;
      // D = (every-node sum) - (every-second-node sum) of the tail
      B0 += S0 - D0;
      B1 += S1 - D1;
      Bp += Sp - Dp;
      // omitted terms of the series (below x^M / M! of the first) and each node's error in v (|dK/dv| <= e^v)
      const omit = (xm * x) / (fact * TAIL_TERMS);
      T0 = omit * g.pre[0][i];
      T1 = omit * g.pre[1][i];
      Tp = omit * g.pre[2][i];
      P0 += x * g.qre[0][i];
      P1 += x * g.qre[1][i];
      Pp += x * g.qre[2][i];
      out.nodes += 2 * TAIL_TERMS;
      // what lies left of the stored grid
      const iF = g.iFirst;
      const jF = g.lo + iF;
      if (jF <= g.jFirst || iF > 0) {
        l0 = l1 = lp = 0;
        break;
      }
      g.row(jF, r);
      const vF = lh + r.w;
      sLast = Math.exp(vF);
      kLast = Math.exp(vF - sLast);
      leftRemainder(vF);
      if (l0 <= REL * A0 && l1 <= REL * A1 && lp <= REL * Ap) break;
      if (r.tl === 0) break;
      // rare: the stored grid ends before the kernel is negligible; march on beyond it
      for (let jj = jF - 1; ; jj--) {
        if (!g.row(jj, r)) {
          l0 = l1 = lp = 0;
          break;
        }
        const v = add(jj);
        leftRemainder(v);
        if (l0 <= REL * A0 && l1 <= REL * A1 && lp <= REL * Ap) break;
        if (r.tl === 0) break;
      }
      break;
    }
    const v = add(j);
    // above V_TAIL on the stored grid the prefix sums take over further left: no remainder to check yet (with a
    // finite end, v may stay above V_TAIL down to the end, and the remainder decides where to stop)
    if (!bounded && i > 0 && i < g.n) continue;
    leftRemainder(v);
    if (l0 <= REL * A0 && l1 <= REL * A1 && lp <= REL * Ap) break;
    if (r.tl === 0) break;
  }
  // a finite end of log V leaves the boundary term Theta_high(w_end) (1 - exp(-h V_end)) = L (1 - exp(-h V_end)) in I1
  const b1 = bounded ? -L * Math.expm1(-Math.exp(vEnd)) : 0;
  A0 += C0;
  A1 += C1;
  Ap += Cp;
  out.I0 = A0;
  out.I1 = A1 + b1;
  out.Ip = Ap;
  // the sums' rounding (Proposition 4.5 above, u = eps/2, plus the final addition of the boundary term's 3 eps)
  const u = Number.EPSILON / 2;
  const gam = ((added + 1) * u) / (1 - (added + 1) * u);
  const sum = 2 * u + gam * gam;
  // for an exponentially convergent rule the error of the h-sum is far below its difference to the 2h-sum
  out.e0 = Math.abs(A0 - B0) + r0 + l0 + P0 + T0 + R0 + sum * A0 + 1e-13 * A0;
  out.e1 = Math.abs(A1 - B1) + r1 + l1 + P1 + T1 + R1 + sum * A1 + 3 * Number.EPSILON * b1 + 1e-13 * A1;
  out.ep = Math.abs(Ap - Bp) + rp + lp + Pp + Tp + Rp + sum * Ap + 1e-13 * Ap;
  return out;
}
