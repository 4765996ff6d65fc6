import type { Bounded } from "./families/normal-bounded";
import { normalCdfFast } from "./families/normal-table";
import { gaussLegendre as unitRule } from "./quadrature";
import { glEnclosure } from "./gl-enclosure";

/**
 * The law of X_1 + X_2, X_i iid lognormal(mu, sigma): cdf F_2, density f_2 and integrated cdf I_2 = int_0^x F_2 at x,
 * each with a bound on its error. With m = x/2, v_m = (log m - mu)/sigma and y(v) = e^{mu + sigma v} (the smaller
 * claim, which is below m whenever the sum is below x):
 *   F_2(x) = 2 int_{-inf}^{v_m} phi(v) Phi(w(v)) dv - Phi(v_m)^2,        w(v) = (log(x - y(v)) - mu) / sigma,
 *   f_2(x) = 2 int_{-inf}^{v_m} phi(v) f(x - y(v)) dv,
 *   I_2(x) = 2 int_{-inf}^{v_m} phi(v) I_1(x - y(v)) dv - x Phi(v_m)^2 + 2 Phi(v_m) e^{mu + sigma^2/2} Phi(v_m - sigma),
 * (inclusion-exclusion over {X_1 <= m}, {X_2 <= m}; I_1(z) = z Phi(w_z) - e^{mu + sigma^2/2} Phi(w_z - sigma), the
 * limited expected value, Klugman, Panjer & Willmot, Loss Models, app. A).
 * The integrands are analytic in v wherever |y(v)| < x, i.e. left of Re v = v_m + log(2)/sigma. Gauss-Legendre
 * panels on [v_lo, v_m] whose Bernstein ellipses stay left of Re v = v_m + log(2)/(2 sigma) (there |y| <= x / sqrt 2,
 * so |arg(x - y)| <= pi/4 and |x - y| >= x (1 - 1/sqrt 2)) and within |Im v| <= MAX_IM; on them
 *   |phi(v)| <= phi(Re v) e^{(Im v)^2/2},  |Phi(a + i b)| <= e^{b^2/2} Phi(a) <= e^{b^2/2} (integrate along Im = b),
 * and the error of an n-point rule is at most (64/15) M L rho^{-2n} / (rho^2 - 1) (Trefethen, Approximation Theory
 * and Approximation Practice, thm 19.3; L the half-length, M the bound on the ellipse E_rho).
 * Rounding, carried per node to first order (u = 2^-53, Math.exp/log within one ulp, the project's standing assumption):
 * Phi with its derived bound (./families/normal-table.ts) plus phi times its argument's rounding; the node v's own
 * rounding moves phi(v) by |v| dv relative and w by at most dv (|dw/dv| = y/(x - y) <= 1 on the real panel); the sums'
 * rounding by Higham's running bound (Accuracy and Stability of Numerical Algorithms, 2002, sec. 4.2). The panels'
 * ends, formed in floating point, leave gaps or overlaps between neighbours: each costs its width times the
 * integrand's size there. The split point v_m itself may be rounded: F_2 and I_2 as written are stationary in it (their
 * derivative in v_m, 2 phi(v_m) (Phi(w(v_m)) - Phi(v_m)) and its I_2 counterpart, vanishes since w(v_m) = v_m).
 * The Gauss-Legendre nodes and weights as computed are within derived enclosures of the true ones (./gl-enclosure.ts): a
 * node within 2 dx_i (and the map 1 - 2x's rounding) of its place, joining the node's move dv, a weight within dw_i / w_i
 * relative, joining the weight's rounding.
 */
export interface PairValues {
  F: number;
  f: number;
  I: number;
  errF: number;
  errf: number;
  errI: number;
}

const U = Number.EPSILON / 2;
const SQ2PI = Math.sqrt(2 * Math.PI);
const V_LO = -10;
/** Phi(-10), the mass the integrals leave out on the left (A&S 26.2.12: below phi(10)/10 = 7.7e-24) */
const LEFT = 7.7e-24;
/** default per-panel quadrature target (on F_2, which is at most 1); a caller that needs less passes its own */
const PANEL_TOL = 1e-16;
/**
 * the ellipses' reach off the real axis: their bound grows by e^{(Im v)^2 / 2} while rho grows with it; 2.5 takes some 67
 * nodes a point where 1.5 took 87 (sigma 0.5 to 2.5, 1 000 points, per-panel target 1e-12, the same stated bounds)
 */
const MAX_IM = 2.5;

/** phi(z), for the bounds only: its rounding (a few u) is below their 1% margins */
const phi = (z: number) => Math.exp(-0.5 * z * z) / SQ2PI;
// scratch for the Phi values (no allocation at the nodes)
const PM: Bounded = { v: NaN, e: NaN };
const PX: Bounded = { v: NaN, e: NaN };
const PW: Bounded = { v: NaN, e: NaN };
const PW2: Bounded = { v: NaN, e: NaN };
const PC: Bounded = { v: NaN, e: NaN };

const RULES = new Map<number, { x: Float64Array; w: Float64Array; dx: Float64Array; dwRel: Float64Array }>();
/** Gauss-Legendre nodes and weights on [-1, 1]: quadrature.ts's rule on [0, 1] mapped by z = 1 - 2u, cached per n */
const rule = (n: number) => {
  let r = RULES.get(n);
  if (!r) {
    const u = unitRule(n);
    const g = glEnclosure(n);
    // on [-1, 1]: the node 1 - 2x within 2 dx of the true one plus the subtraction's rounding; 2w exact
    r = {
      x: u.x.map((v) => 1 - 2 * v),
      w: u.w.map((v) => 2 * v),
      dx: u.x.map((v, i) => (2 * g.dx[i] + U * Math.abs(1 - 2 * v)) * (1 + 4 * U)),
      dwRel: u.w.map((v, i) => (g.dw[i] / v) * (1 + 4 * U)),
    };
    RULES.set(n, r);
  }
  return r;
};

/**
 * `at(x, wantPdf, wantInt, panelTol)`: a part not asked for is not formed (its value NaN, its bound Infinity), which
 * saves its transcendental calls at every node (the cdf alone takes one exp, one log and one Phi a node of the five);
 * panelTol is the per-panel target of the rule's bound on each part asked for (F_2, and f_2, I_2 through their scales of the
 * rule's bound below; default 1e-16; the bounds returned hold for any target)
 */
export function lognormalPair(
  mu: number,
  sigma: number,
): { at(x: number, wantPdf?: boolean, wantInt?: boolean, panelTol?: number): PairValues; densityBeyond(from: number): number } {
  const m1 = Math.exp(mu + (sigma * sigma) / 2);
  const d = Math.LN2 / sigma;
  // on the ellipses: |Phi(w)|, |phi(w)| <= e^{(arg / sigma)^2 / 2} with |arg(x - y)| <= pi/4
  const gW = Math.exp((Math.PI / 4) ** 2 / (2 * sigma * sigma));
  // m1's relative error: the exponent within u (sigma^2 + |mu + sigma^2/2|), exp one ulp
  const m1Rel = 1.01 * (U * (sigma * sigma + Math.abs(mu + (sigma * sigma) / 2)) + 2 * U);
  const mode = Math.exp(mu - sigma * sigma);
  const modeRel = 1.01 * U * (sigma * sigma + Math.abs(mu - sigma * sigma) + 2);
  /**
   * the density f(z) raised by its rounding (z within rz relative: log z moves by rz; the log 2u, the subtraction, the
   * division, the square, exp, sigma SQ2PI and the rest a few u)
   */
  const pdfUp = (z: number, rz: number) => {
    if (!(z > 0)) return 0;
    const lz = Math.log(z);
    const w = (lz - mu) / sigma;
    const dw = (rz + U * (2 * Math.abs(lz) + Math.abs(lz - mu))) / sigma + U * Math.abs(w);
    return (Math.exp(-0.5 * w * w) / (z * sigma * SQ2PI)) * (1 + 1.01 * (Math.abs(w) * dw + U * (w * w + 10)));
  };
  // sup f = f(mode) (the rounded mode is within modeRel of it, where f is stationary)
  const fMax = pdfUp(mode, modeRel) * (1 + U);
  // the panels, as distances below v_m: [s_k, s_{k+1}] with half-length L and the ellipse parameter rho
  const panels: { s0: number; s1: number; L: number; rho: number }[] = [];
  {
    let s = 0;
    while (s < 40) {
      // the ellipse's right end c + L (rho + 1/rho)/2 <= v_m + d/2, with c = v_m - s - L; and L (rho - 1/rho)/2 <= MAX_IM
      let L = Math.min(s + d / 2, MAX_IM / Math.sqrt(3));
      L = Math.max(L, 1e-3);
      const ca = 1 + (s + d / 2) / L;
      const rA = ca + Math.sqrt(ca * ca - 1);
      const cb = MAX_IM / L;
      const rB = cb + Math.sqrt(cb * cb + 1);
      panels.push({ s0: s, s1: s + 2 * L, L, rho: Math.min(rA, rB) });
      s += 2 * L;
    }
  }
  const at = (x: number, wantPdf = true, wantInt = true, panelTol = PANEL_TOL): PairValues => {
    if (!(x > 0)) return { F: 0, f: 0, I: 0, errF: 0, errf: 0, errI: 0 };
    const lh = Math.log(x / 2);
    const vm = (lh - mu) / sigma;
    const Pm = normalCdfFast(vm, PM);
    if (vm <= V_LO) {
      // F_2(x) <= F(x)^2, f_2(x) <= 2 F(x/2) sup_{z >= x/2} f(z), I_2 <= x F_2(x): returned as 0 with those bounds, each
      // Phi raised by its bound and by phi times its argument's rounding (log within 2u |lh|, the subtraction, the
      // division and the sum u each; d = log 2 / sigma within 2u)
      const dvm = 1.01 * ((U * (2 * Math.abs(lh) + Math.abs(lh - mu))) / sigma + U * Math.abs(vm));
      const a = vm + d;
      const Fx = normalCdfFast(a, PX);
      const FxUp = Fx.v + Fx.e + 1.01 * phi(a) * (dvm + U * (2 * d + Math.abs(a)));
      const PmUp = Pm.v + Pm.e + 1.01 * phi(vm) * dvm;
      return {
        F: 0,
        f: wantPdf ? 0 : NaN,
        I: wantInt ? 0 : NaN,
        errF: FxUp * FxUp * (1 + 4 * U),
        errf: wantPdf ? 2 * PmUp * (x / 2 > mode ? pdfUp(x / 2, 0) : fMax) * (1 + 4 * U) : Infinity,
        errI: wantInt ? x * FxUp * FxUp * (1 + 4 * U) : Infinity,
      };
    }
    let sumF = 0;
    let sf = 0;
    let sI = 0;
    // the terms' own errors and the sums' running rounding
    let eF = 0;
    let ef = 0;
    let eI = 0;
    // the gaps between the panels' ends, weighted by phi there
    let gap = 0;
    let qF = 0;
    const span = vm - V_LO;
    // the rule's bound on f_2 and I_2 is qF times fScale, iScale (see the return): the per-panel target on F_2 is cut by the larger
    // of those asked for, so that each part asked for is within about panelTol a panel
    const fScale = 1 / (SQ2PI * sigma * x * (1 - Math.SQRT1_2));
    const iScale = x * (1 + Math.SQRT1_2) + m1;
    // on every ellipse and on the real panel |x - y| >= x (1 - 1/sqrt 2), so Re w >= wMin (less a margin for its rounding):
    // where wMin > 0, |phi(w)| <= gW phi(wMin) (the density's factor falls by e^{-wMin^2 / 2}), and |Phi(-w)| <= gW Phi(-wMin).
    // Where wMin > 1 (and I_2, which takes Phi(w) itself, is not asked), F_2 is taken from the complement, 2 Phi(v_m) - Phi(v_m)^2 - 2 int phi(v) Phi(-w(v)) dv (Phi(w) =
    // 1 - Phi(-w)), whose integrand is that small: far out most panels are then below the target and left out
    const lMin = Math.log(x * (1 - Math.SQRT1_2));
    const wMin = (lMin - mu) / sigma - (1e-9 * (1 + Math.abs(lMin) + Math.abs(mu))) / sigma;
    const comp = wMin > 1 && !wantInt;
    const sF = comp ? 1.01 * (normalCdfFast(-wMin, PC).v + PC.e) : 1;
    const sfScale = wMin > 0 ? fScale * Math.exp(-0.5 * wMin * wMin) * 1.01 : fScale;
    // each part's rule bound is qF times its scale (sF, sfScale, iScale): the per-panel target on qF is cut by the largest
    // of those asked for, so that each part asked for is within about panelTol a panel
    const target = panelTol / Math.max(sF, wantPdf ? sfScale : 0, wantInt ? iScale : 0);
    for (const p of panels) {
      if (p.s0 >= span) break;
      const cut = p.s1 > span;
      const s1 = cut ? span : p.s1;
      const L = 0.5 * (s1 - p.s0);
      const c = vm - p.s0 - L;
      // the ellipse for this (possibly shortened) panel: same rho, smaller L, so it stays inside the region
      const La = (L * (p.rho + 1 / p.rho)) / 2;
      const Lb = (L * (p.rho - 1 / p.rho)) / 2;
      const lo = c - La;
      const hi = c + La;
      const minRe2 = lo <= 0 && hi >= 0 ? 0 : Math.min(lo * lo, hi * hi);
      const M = (Math.exp(-0.5 * minRe2 + 0.5 * Lb * Lb) / SQ2PI) * gW;
      const k = ((64 / 15) * M * L) / (p.rho * p.rho - 1);
      // the ends c -+ L against v_m - s0 - 2L and v_m - s0: c's two roundings, s1 - s0's, and the last panel's end
      // v_m - span against V_LO (span's rounding); the integrands there at most phi (times 1, sup f, x)
      const a0 = c - L;
      const a1 = c + L;
      const near = a0 <= 0 && a1 >= 0 ? 0 : Math.min(Math.abs(a0), Math.abs(a1));
      gap += (U * (2 * Math.abs(vm - p.s0) + 2 * Math.abs(c) + 2 * L + (cut ? span : 0))) * phi(near);
      // a panel whose integrands are below the target over its whole length is left out: on the real segment
      // phi(v) Phi(+-w) <= phi(near) sF, and f(x - y) = phi(w) / (sigma (x - y)) <= sfScale, I_1(x - y) <= x <= iScale
      // (x - y >= x / 2, w >= wMin), so its integrals are within 2 L phi(near) times sF, sfScale, iScale, as the rule's bound is
      const skip = 2.02 * L * phi(near);
      if (skip <= target) {
        qF += skip;
        continue;
      }
      // the fewest nodes whose bound k rho^{-2n} is below the panel target (every count up to 16, then steps of 4)
      let n = 4;
      while (n < 48 && k * Math.pow(p.rho, -2 * n) > target) n += n < 16 ? 1 : 4;
      qF += k * Math.pow(p.rho, -2 * n);
      const r = rule(n);
      for (let i = 0; i < n; i++) {
        const Lx = L * r.x[i];
        const v = c + Lx;
        // v within dv of c + L x_i; the weight L w_i phi(v): v^2 u, exp 2u, SQ2PI 2u, three products and a division,
        // and phi's move |v| dv with the node
        const dv = U * (Math.abs(Lx) + Math.abs(v)) + L * r.dx[i];
        const wt = L * r.w[i] * (Math.exp(-0.5 * v * v) / SQ2PI);
        const rw = U * (v * v + 9) + Math.abs(v) * dv + r.dwRel[i];
        const e = mu + sigma * v;
        const y = Math.exp(e);
        const z = x - y;
        // y within ry relative (e's two roundings, the node's move sigma dv, exp); z within rz relative (y's error,
        // the subtraction; y <= x/2 <= z on the real panel)
        const ry = U * (Math.abs(sigma * v) + Math.abs(e) + 2) + sigma * dv;
        const rz = (y * ry) / z + U;
        const lz = Math.log(z);
        const wz = (lz - mu) / sigma;
        // wz's error: log's 2u |lz| and z's rz, the subtraction and the division
        const dw = (rz + U * (2 * Math.abs(lz) + Math.abs(lz - mu))) / sigma + U * Math.abs(wz);
        // Phi(-wz) for the complement (phi is even: the same bound)
        const P = normalCdfFast(comp ? -wz : wz, PW);
        // phi(wz) for P's bound and, where asked, the density's factor: one exp for both
        const ew = Math.exp(-0.5 * wz * wz);
        const pw = ew / SQ2PI;
        const eP = P.e + 1.01 * pw * dw;
        const tF = wt * P.v;
        sumF += tF;
        eF += wt * eP + tF * (rw + U) + U * sumF;
        if (wantPdf) {
          const tf = (wt * ew) / (z * sigma * SQ2PI);
          sf += tf;
          // exp(-wz^2/2) moves by |wz| dw and rounds u wz^2 + 2u; z, sigma SQ2PI (2u), two products and the division
          ef += tf * (rw + 1.01 * Math.abs(wz) * dw + U * (wz * wz + 8) + rz) + U * sf;
        }
        if (wantInt) {
          const w2 = wz - sigma;
          const P2 = normalCdfFast(w2, PW2);
          const eP2 = P2.e + 1.01 * phi(w2) * (dw + U * Math.abs(w2));
          const zP = z * P.v;
          const mP = m1 * P2.v;
          const g = zP - mP;
          const tI = wt * g;
          sI += tI;
          // z P: z's rz, P's eP and the product; m1 P2: m1's m1Rel, P2's eP2 and the product; the difference
          const eg = z * (P.v * (rz + U) + eP) + m1 * (P2.v * (m1Rel + U) + eP2) + U * Math.abs(g);
          eI += wt * eg + Math.abs(tI) * (rw + U) + U * Math.abs(sI);
        }
      }
    }
    gap *= 1.01;
    const Pm2 = Pm.v * Pm.v;
    // the complement: 2 Phi(v_m) exact but for Pm's error (its derivative 2 - 2 Phi at most 2), the difference rounded
    const head = comp ? 2 * Pm.v - Pm2 : 0;
    const F0 = comp ? head - 2 * sumF : 2 * sumF - Pm2;
    const F = Math.min(Math.max(F0, 0), 1);
    const f = wantPdf ? Math.max(2 * sf, 0) : NaN;
    let I = NaN;
    let roundI = Infinity;
    if (wantInt) {
      // P2m's argument v_m - sigma rounds by u |v_m - sigma| (v_m's own rounding is the stationary split point)
      const a2 = vm - sigma;
      const P2m = normalCdfFast(a2, PW2);
      const eP2m = P2m.e + 1.01 * phi(a2) * U * Math.abs(a2);
      const xP = x * Pm2;
      const tail = 2 * Pm.v * m1 * P2m.v;
      const I0 = 2 * sI - xP + tail;
      I = Math.max(I0, 0);
      // 2 sI's error; x Pm^2 (Pm's error, two products); 2 Pm m1 P2m (each factor's error, three products); two sums
      roundI = 1.01 * (2 * eI + x * (2 * Pm.v * Pm.e + 2 * U * Pm2) + 2 * m1 * (Pm.e * P2m.v + Pm.v * eP2m) + tail * (m1Rel + 3 * U) + U * (Math.abs(2 * sI - xP) + Math.abs(I0)));
    }
    // the rule's bound scales with M: for f_2 by |f(x - y)| / |Phi(w)| <= 1 / (sqrt(2 pi) sigma x (1 - 1/sqrt 2)),
    // for I_2 by |I_1(x - y)| / |Phi(w)| <= x (1 + 1/sqrt 2) + m1
    // left of v_lo and in the gaps: the integrands are at most 1, sup f, x
    return {
      F,
      f,
      I,
      errF: 2 * (qF * sF + LEFT + gap) + 1.01 * (2 * eF + (comp ? 2 * Pm.e : 0) + 2 * Pm.v * Pm.e + U * (Pm2 + Math.abs(head) + Math.abs(F0))),
      errf: wantPdf ? 2 * (qF * sfScale + (LEFT + gap) * fMax) + 1.01 * 2 * ef : Infinity,
      errI: wantInt ? 2 * (qF * iScale + (LEFT + gap) * x) + roundI : Infinity,
    };
  };
  // f_2(y) = 2 int_0^{y/2} f(u) f(y - u) du <= 2 sup_{z >= y/2} f(z) (f decreases beyond its mode)
  const densityBeyond = (from: number) => 2 * (from / 2 > mode ? pdfUp(from / 2, 0) : fMax) * (1 + U);
  return { at, densityBeyond };
}
