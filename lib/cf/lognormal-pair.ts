import erfc from "@stdlib/math-base-special-erfc";
import { gaussLegendre as unitRule } from "./quadrature";

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
 */
export interface PairValues {
  F: number;
  f: number;
  I: number;
  errF: number;
  errf: number;
  errI: number;
}

/** relative accuracy of Phi through @stdlib erfc (about 1 ulp; 1e-13 leaves room for the argument's rounding) */
const ACC = 1e-13;
const SQ2PI = Math.sqrt(2 * Math.PI);
const Phi = (z: number) => 0.5 * erfc(-z / Math.SQRT2);
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

const RULES = new Map<number, { x: Float64Array; w: Float64Array }>();
/** Gauss-Legendre nodes and weights on [-1, 1]: quadrature.ts's rule on [0, 1] mapped by z = 1 - 2u, cached per n */
const rule = (n: number) => {
  let r = RULES.get(n);
  if (!r) {
    const u = unitRule(n);
    r = { x: u.x.map((v) => 1 - 2 * v), w: u.w.map((v) => 2 * v) };
    RULES.set(n, r);
  }
  return r;
};

/**
 * `at(x, wantPdf, wantInt, panelTol)`: a part not asked for is not formed (its value NaN, its bound Infinity), which
 * saves its transcendental calls at every node (the cdf alone takes one exp, one log and one Phi a node of the five);
 * panelTol is the per-panel target of the rule's bound (default 1e-16; the bounds returned hold for any target)
 */
export function lognormalPair(
  mu: number,
  sigma: number,
): { at(x: number, wantPdf?: boolean, wantInt?: boolean, panelTol?: number): PairValues; densityBeyond(from: number): number } {
  const m1 = Math.exp(mu + (sigma * sigma) / 2);
  const d = Math.LN2 / sigma;
  // on the ellipses: |Phi(w)|, |phi(w)| <= e^{(arg / sigma)^2 / 2} with |arg(x - y)| <= pi/4
  const gW = Math.exp((Math.PI / 4) ** 2 / (2 * sigma * sigma));
  const mode = Math.exp(mu - sigma * sigma);
  const pdf1 = (z: number) => (z > 0 ? Math.exp(-0.5 * ((Math.log(z) - mu) / sigma) ** 2) / (z * sigma * SQ2PI) : 0);
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
    const vm = (Math.log(x / 2) - mu) / sigma;
    const Pm = Phi(vm);
    if (vm <= V_LO) {
      // F_2(x) <= F(x)^2, f_2(x) <= 2 F(x/2) sup_{z >= x/2} f(z), I_2 <= x F_2(x): returned as 0 with those bounds
      const Fx = Phi(vm + d);
      return {
        F: 0,
        f: wantPdf ? 0 : NaN,
        I: wantInt ? 0 : NaN,
        errF: Fx * Fx,
        errf: wantPdf ? 2 * Pm * pdf1(Math.max(x / 2, mode)) : Infinity,
        errI: wantInt ? x * Fx * Fx : Infinity,
      };
    }
    let sF = 0;
    let sf = 0;
    let sI = 0;
    let aF = 0;
    let aI = 0;
    let rf = 0;
    let qF = 0;
    const span = vm - V_LO;
    for (const p of panels) {
      if (p.s0 >= span) break;
      const s1 = Math.min(p.s1, span);
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
      // the fewest nodes from the list whose bound k rho^{-2n} is below the panel target
      let n = 4;
      while (n < 48 && k * Math.pow(p.rho, -2 * n) > panelTol) n += 4;
      qF += k * Math.pow(p.rho, -2 * n);
      const r = rule(n);
      for (let i = 0; i < n; i++) {
        const v = c + L * r.x[i];
        const wt = L * r.w[i] * (Math.exp(-0.5 * v * v) / SQ2PI);
        const z = x - Math.exp(mu + sigma * v);
        const lz = Math.log(z);
        const wz = (lz - mu) / sigma;
        const P = Phi(wz);
        sF += wt * P;
        aF += wt * P;
        if (wantPdf) {
          const tf = (wt * Math.exp(-0.5 * wz * wz)) / (z * sigma * SQ2PI);
          sf += tf;
          // rounding of the density term: its exponent carries |wz| times the rounding of wz (logs of z and x)
          rf += tf * Number.EPSILON * (16 + (2 * Math.abs(wz) * (Math.abs(lz) + Math.abs(mu) + 1)) / sigma);
        }
        if (wantInt) {
          const P2 = Phi(wz - sigma);
          sI += wt * (z * P - m1 * P2);
          aI += wt * (z * P + m1 * P2);
        }
      }
    }
    const P2m = wantInt ? Phi(vm - sigma) : NaN;
    const F = Math.min(Math.max(2 * sF - Pm * Pm, 0), 1);
    const f = wantPdf ? Math.max(2 * sf, 0) : NaN;
    const I = wantInt ? Math.max(2 * sI - x * Pm * Pm + 2 * Pm * m1 * P2m, 0) : NaN;
    // the rule's bound scales with M: for f_2 by |f(x - y)| / |Phi(w)| <= 1 / (sqrt(2 pi) sigma x (1 - 1/sqrt 2)),
    // for I_2 by |I_1(x - y)| / |Phi(w)| <= x (1 + 1/sqrt 2) + m1
    const fScale = 1 / (SQ2PI * sigma * x * (1 - Math.SQRT1_2));
    const iScale = x * (1 + Math.SQRT1_2) + m1;
    // left of v_lo: the integrands are at most 1, sup f = f(mode), x
    const fMax = pdf1(mode);
    const round = 8 * Number.EPSILON;
    return {
      F,
      f,
      I,
      errF: 2 * (qF + LEFT) + (ACC + round) * (2 * aF + Pm * Pm),
      errf: wantPdf ? 2 * (qF * fScale + LEFT * fMax) + 2 * rf + round * f : Infinity,
      errI: wantInt ? 2 * (qF * iScale + LEFT * x) + (ACC + round) * (2 * aI + x * Pm * Pm + 2 * Pm * m1 * P2m) : Infinity,
    };
  };
  // f_2(y) = 2 int_0^{y/2} f(u) f(y - u) du <= 2 sup_{z >= y/2} f(z) (f decreases beyond its mode)
  const densityBeyond = (from: number) => 2 * pdf1(Math.max(from / 2, mode));
  return { at, densityBeyond };
}
