import { stableIntegrals, type StableIntegrals } from "./stable-integral";
import { stableOneFar, stableOneLight, stableOnePanels, stableOneWindow } from "./stable-far";
import { stableNearOne } from "./stable-near-one";
import { stableSide, tanHalfPi } from "./stable-kernel";
import { stablePanels, stableWindowPanels, within } from "./stable-panels";
import { alphaTightBox } from "./stable-box";
import { stableLightPanels } from "./stable-light";
import type { PanelSide } from "./stable-panel-store";
import { stableTailSeries, stableTailSplit, stableTailStopLoss } from "./stable-series";
import { stablePowerTail } from "./power-tail";
import { smoothOver, stableSmooth } from "./stable-smooth";
import { oneTailSplit, stableOneTail } from "./stable-one-tail";
import type { DirectLaw, DirectPoint } from "./types";
import { lgamma, lgammaErr } from "../families/special";
import { cauchyDirect, normalDirect } from "./families";

const HALF_PI = Math.PI / 2;

/**
 * Stable law evaluated without its CF: Nolan's (1997) integral representation for the body, the tail series
 * (./stable-series.ts) where it has converged, for 0 < alpha < 2 in S0 or S1, including alpha = 1
 * (alpha = 2 and alpha = 1, beta = 0 are normal and Cauchy and come from their closed forms).
 * With z the S1 standard variable (x - loc_S1) / scale, which is x - zeta in Nolan's S0 notation, for z > 0:
 *   alpha < 1:  F = (pi/2 - theta0)/pi + I0/pi,  sf = I1/pi
 *   alpha > 1:  F = (pi/2 - theta0)/pi + I1/pi,  sf = I0/pi
 *   f = alpha / (pi |alpha - 1| z) Ip,  log h = alpha/(alpha-1) log z
 * alpha = 1 (beta > 0): F = I0/pi, sf = I1/pi, f = Ip / (2 beta), log h = -pi z / (2 beta).
 * z < 0 reflects (z, beta) -> (-z, -beta) and swaps F and sf. I0, I1, Ip: see ./stable-integral.ts.
 * The integrals come from Gauss-Legendre panels in theta with a derived error bound (./stable-panels.ts, their
 * rectangles' bounds on log V tightened by ./stable-box.ts, which also keeps them usable next to alpha = 1): the shared
 * panels (from the middle of the theta interval, up to their cap) and for alpha = 1 with |log h| <= 4000, else panels of the point's own placed at its
 * window. alpha = 1 far out (|z| >= 30) takes its tail series with a derived remainder (./stable-one-tail.ts) first.
 * Where the panels' bound is above PANELS_REL of a value, the value comes from another rule (the Gauss rule in log V
 * next to alpha = 1, ./stable-near-one.ts, far out at alpha = 1, ./stable-far.ts, else the grid, ./stable-integral.ts)
 * and its bound is its distance to the panels plus theirs (derivedBound); where no panels can be placed the bound is
 * Infinity.
 */
export function stableDirect(alpha: number, beta: number, scale: number, loc: number, param: "S0" | "S1"): DirectLaw | null {
  if (!(scale > 0) || !Number.isFinite(loc)) return null;
  // alpha = 2: normal with variance 2 scale^2; alpha = 1, beta = 0: Cauchy (the same in S0 and S1)
  if (alpha === 2) return normalDirect(loc, Math.SQRT2 * scale);
  if (alpha === 1 && beta === 0) return cauchyDirect(loc, scale);
  if (!(alpha > 0 && alpha < 2)) return null;
  const g = scale;
  // the S1 location: d1 = d0 - beta g tan(pi alpha/2) (alpha != 1), d0 - beta (2/pi) g log g (alpha = 1)
  const shift10 = alpha === 1 ? beta * (2 / Math.PI) * g * Math.log(g) : beta * g * tanHalfPi(alpha);
  const d1 = param === "S1" ? loc : loc - shift10;
  let support: [number, number] = [-Infinity, Infinity];
  if (alpha < 1 && beta === 1) support = [d1, Infinity];
  if (alpha < 1 && beta === -1) support = [-Infinity, d1];
  const powerTail = stablePowerTail(alpha, beta, g, d1);
  const smooth = alpha === 1 ? null : { 1: stableSmooth(alpha, beta, 1), 3: stableSmooth(alpha, beta, 3), 7: stableSmooth(alpha, beta, 7) };
  // half-line laws start at d1; otherwise z = 0 is an interior point handled by the closed forms at zeta
  const at = (x: number, out: DirectPoint) => {
    const z = (x - d1) / g;
    // rounding of z itself: x - d1 and the division (2 eps (|x| + |d1|)), d1's own (the S0 shift within 4 eps of
    // itself); it moves F by f |dz| and the density through log h (stdAt)
    const dz = (2 * Number.EPSILON * (Math.abs(x) + Math.abs(d1)) + (param === "S1" ? 0 : 4 * Number.EPSILON * Math.abs(shift10))) / g;
    stdAt(alpha, beta, z, out, dz);
    out.pdf /= g;
    out.pdfErr /= g;
    out.cdfErr += out.pdf * g * dz;
    out.sfErr += out.pdf * g * dz;
    out.pdfErr += 4 * Number.EPSILON * out.pdf;
  };
  return {
    method: "stable-integral",
    support,
    center: alpha < 1 && beta === 1 ? d1 + g : alpha < 1 && beta === -1 ? d1 - g : param === "S0" ? loc : d1,
    spread: g,
    // stable laws are unimodal (Yamazato 1978, Ann. Probab. 6)
    unimodal: true,
    ...(powerTail ? { powerTail } : {}),
    at,
    ...(smooth && smooth[1] && smooth[3] && smooth[7]
      ? {
          // the standard law's bound (./stable-smooth.ts) over z's interval widened by its rounding, over g^(k+1)
          pdfDeriv: (k: 1 | 3 | 7, a: number, b: number) => {
            const dz = (2 * Number.EPSILON * (Math.abs(a) + Math.abs(b) + Math.abs(d1)) + (param === "S1" ? 0 : 4 * Number.EPSILON * Math.abs(shift10))) / g;
            const s = smooth[k]!;
            return (smoothOver(s, (a - d1) / g - dz, (b - d1) / g + dz) / Math.pow(g, k + 1)) * (1 + 8 * Number.EPSILON);
          },
        }
      : {}),
    // far in a tail (alpha > 1, alpha != 2): the tail series integrated (./stable-series.ts); z < 0 by reflection
    stopLoss: (c: number, side: 1 | -1) => {
      const z = (side * (c - d1)) / g;
      if (!(z > 0)) return null;
      const r = stableTailStopLoss(alpha, side * beta, z);
      // times g; the rounding of z moves pi by sf(z) |dz| g <= pi (2 eps (|c| + |d1|) / g) / z
      return r ? { v: g * r.v, e: g * r.e + 4 * Number.EPSILON * g * r.v * (1 + (Math.abs(c) + Math.abs(d1)) / (g * z)) } : null;
    },
    // far in a tail: the tail series' powers and its remainder (./stable-series.ts; alpha = 1 ./stable-one-tail.ts); z < 0 by reflection,
    // z taken inward by its rounding (the sizes fall outward), the step in units of g rounded down
    monotoneSplit: (y: number, side: 1 | -1, step: number, stopLoss: boolean) => {
      const dz = (2 * Number.EPSILON * (Math.abs(y) + Math.abs(d1)) + (param === "S1" ? 0 : 4 * Number.EPSILON * Math.abs(shift10))) / g;
      const z = ((side * (y - d1)) / g - dz) * (1 - 2 * Number.EPSILON);
      const st = (step / g) * (1 - 4 * Number.EPSILON);
      // alpha = 1: the contour's Laplace-transform piece (./stable-one-tail.ts); no stop-loss transform (no mean)
      const r = alpha === 1 ? (stopLoss ? null : oneTailSplit(side * beta, z, st)) : stableTailSplit(alpha, side * beta, z, st, stopLoss);
      if (!r) return null;
      const u = 1 + 4 * Number.EPSILON;
      return { tail: r.tail, pdf: (r.pdf / g) * u, stopLoss: r.stopLoss * g * u, restTail: r.restTail, restPdf: (r.restPdf / g) * u, restStopLoss: r.restStopLoss * g * u };
    },
    notes: [
      "stable law evaluated directly: Nolan (1997) integral representation in the body, tail series where converged; no CF inversion",
    ],
  };
}

/**
 * how the last point stdAt answered got its bound, for scripts/stable-routes.ts: "derived" (the panels' own bound or a
 * closed form's), "compared" (a rule's value, its bound its distance to panels plus theirs: derived too), "none"
 * (no panels could be placed: the bound is Infinity)
 */
let lastRoute: "derived" | "compared" | "none" = "derived";
export function stableLastRoute(): "derived" | "compared" | "none" {
  return lastRoute;
}

/** |z| below which alpha != 1 takes the values at zeta with the moves bounded */
const NEAR_ZETA = 1e-12;

/** Standard S1 stable (scale 1, location 0) at z, z known to within dz (the density's bound takes its effect). */
export function stdAt(alpha: number, beta: number, z: number, out: DirectPoint, dz = 0): void {
  lastRoute = "derived";
  // alpha = 1, beta = 0: the Cauchy law (stableDirect never comes here with it; log h would be infinite)
  if (alpha === 1 && beta === 0) return cauchyDirect(0, 1)!.at(z, out);
  if (alpha === 1) {
    if (beta < 0) {
      oneAt(-beta, -z, out, dz);
      swap(out);
    } else oneAt(beta, z, out, dz);
    return;
  }
  if (z === 0) return atZeta(alpha, beta, out);
  if (Math.abs(z) < NEAR_ZETA) {
    // within a rounding of zeta (where log h runs off and the integrals' bounds with it): the values at zeta, moved by
    // at most sup f |z| and sup |f'| |z|, with sup f <= (1/pi) int |phi| = Gamma(1 + 1/alpha)/pi and
    // sup |f'| <= (1/pi) int t |phi| = Gamma(2/alpha)/(alpha pi) (|phi(t)| = exp(-|t|^alpha); Nolan 2020, sec. 1.3)
    atZeta(alpha, beta, out);
    const az = Math.abs(z) * (1 + 1e-12);
    const dF = (az * Math.exp(lgamma(1 + 1 / alpha))) / Math.PI;
    out.pdfErr += (az * Math.exp(lgamma(2 / alpha))) / (alpha * Math.PI);
    out.cdfErr += dF;
    out.sfErr += dF;
    return;
  }
  if (z > 0) return sideAt(alpha, beta, z, out, dz);
  sideAt(alpha, -beta, -z, out, dz);
  swap(out);
}

function swap(o: DirectPoint) {
  const c = o.cdf;
  const e = o.cdfErr;
  o.cdf = o.sf;
  o.cdfErr = o.sfErr;
  o.sf = c;
  o.sfErr = e;
}

function theta0Of(alpha: number, beta: number): number {
  if (alpha < 1 && beta === 1) return HALF_PI;
  if (alpha < 1 && beta === -1) return -HALF_PI;
  if (alpha > 1 && beta === -1) return Math.PI / alpha - HALF_PI;
  if (alpha > 1 && beta === 1) return -(Math.PI / alpha - HALF_PI);
  return Math.atan(beta * tanHalfPi(alpha)) / alpha;
}

/**
 * x = zeta (z = 0): f = Gamma(1 + 1/alpha) cos(theta0) / (pi (1 + zeta^2)^(1/(2 alpha))), F = (pi/2 - theta0)/pi.
 * Error by running analysis of these steps (u = eps/2, the libm functions within one ulp): lgamma's (lgammaErr) plus its
 * argument's rounding times |psi| <= log y + 1; theta0's (atan of tb, 4 u relative, moves it by <= 2 u / alpha, and
 * its own two roundings) moves cos theta0 by |sin theta0| times it; the power's relative error p log(b) 2 u + p 10 u.
 */
function atZeta(alpha: number, beta: number, out: DirectPoint) {
  const u = Number.EPSILON / 2;
  const th0 = theta0Of(alpha, beta);
  const zeta = -beta * tanHalfPi(alpha);
  const y = 1 + 1 / alpha;
  const eLg = lgammaErr(y) + (Math.log(y) + 1) * 2 * u * y;
  const cosT = Math.cos(th0);
  const dTh = 2 * u / alpha + 4 * u * (Math.abs(th0) + Math.PI / alpha);
  const p = 1 / (2 * alpha);
  const b = 1 + zeta * zeta;
  const pw = Math.pow(b, p);
  const ePow = p * Math.log(b) * 2 * u + p * 10 * u + 2 * u;
  const g = Math.exp(lgamma(y));
  out.pdf = (g * cosT) / (Math.PI * pw);
  out.pdfErr = out.pdf * (Math.expm1(eLg) * (1 + 2 * u) + ePow + 8 * u) + (g / (Math.PI * pw)) * (Math.abs(Math.sin(th0)) * dTh + 2 * u * Math.abs(cosT)) * (1 + 16 * u);
  out.cdf = (HALF_PI - th0) / Math.PI;
  out.sf = (HALF_PI + th0) / Math.PI;
  out.cdfErr = (dTh + 4 * u * (HALF_PI + Math.abs(th0))) / Math.PI + 2 * u * out.cdf;
  out.sfErr = (dTh + 4 * u * (HALF_PI + Math.abs(th0))) / Math.PI + 2 * u * out.sf;
}

/**
 * the panels' relative bound above which another route (with an estimate) is taken for alpha != 1: next to alpha = 1
 * the rounding of log h = alpha/(alpha - 1) log z alone (eps |log h| in v) puts 2e-11 on the density at alpha = 0.999
 */
const PANELS_REL = 1e-9;
const panelSides = new Map<string, PanelSide>();
function panelSideOf(alpha: number, beta: number): PanelSide {
  const key = `${alpha}:${beta}`;
  let p = panelSides.get(key);
  if (!p) {
    if (panelSides.size > 64) panelSides.clear();
    const side = stableSide(alpha, beta);
    p = { side, box: alphaTightBox(side, side.box!) };
    panelSides.set(key, p);
  }
  return p;
}

function sideAt(alpha: number, beta: number, z: number, out: DirectPoint, dz: number) {
  const ps = panelSideOf(alpha, beta);
  // (pi/2 - theta0)/pi from the side's distance a (the plain form loses 3e-17 of 1e-3 next to alpha = 1)
  const [c1, c1Err] = ps.side.F0!;
  const ser = stableTailSeries(alpha, beta, z);
  if (ser) {
    out.pdf = ser.pdf;
    out.pdfErr = ser.pdfErr;
    out.sf = ser.sf;
    out.sfErr = ser.sfErr;
    out.cdf = 1 - ser.sf;
    out.cdfErr = ser.sfErr + Number.EPSILON;
    return;
  }
  const lh = (alpha / (alpha - 1)) * Math.log(z);
  // Gauss-Legendre panels in theta with derived bounds (./stable-panels.ts); where their bound is above PANELS_REL of a
  // value, the value of a Gauss rule in log V next to 1 (./stable-near-one.ts) or of the grid, bounded by comparison
  // z's rounding moves log h by |alpha / (alpha - 1)| dz / z and the prefactor by dz / z relative; where dz / z is not
  // small (z next to 0) the density moves by at most sup |f'| dz <= dz Gamma(2/alpha) / (alpha pi) instead
  // (f' = -(1/pi) Re int t i e^{-itz} phi(t) dt with |phi(t)| = exp(-|t|^alpha): Nolan 2020, sec. 1.3)
  let rz = dz / z;
  let dzPdf = 0;
  if (rz > 1e-8) {
    dzPdf = (dz * Math.exp(lgamma(2 / alpha)) * (1 + 1e-12)) / (alpha * Math.PI);
    rz = 0;
  }
  // an empty interval (alpha < 1, beta = -1 above zeta: no mass there) has integrals 0 exactly
  const dl = Math.abs(alpha / (alpha - 1)) * rz;
  let r: StableIntegrals;
  let near: StableIntegrals | null = null;
  if (!(ps.side.L > 0)) r = { I0: 0, I1: 0, Ip: 0, e0: 0, e1: 0, ep: 0, nodes: 0 };
  else {
    // the shared panels; where they cannot reach (their cap, next to alpha = 1) the point's own at its window
    let pan = stablePanels(ps, lh, Infinity, dl);
    if (!pan) pan = stableWindowPanels(ps, lh, dl);
    // a light side far out: the low half's panels of the point's own, fitted to exp(-e^v) at the end (./stable-light.ts)
    if (!(pan && within(pan, PANELS_REL)) && Number.isFinite(ps.side.wLowEnd)) pan = stableLightPanels(ps, lh, dl) ?? pan;
    if (pan && within(pan, PANELS_REL)) r = pan;
    else {
      near = stableNearOne(alpha, beta, lh);
      r = derivedBound(near ?? stableIntegrals(alpha, beta, lh), pan);
    }
  }
  const pref = alpha / (Math.PI * Math.abs(alpha - 1) * z);
  out.pdf = pref * r.Ip;
  out.pdfErr = pref * r.ep + (4 * Number.EPSILON + 2 * rz) * out.pdf + dzPdf;
  // a relative rounding 4 eps |lh| of log h moves each integral by at most that times f-like terms
  const dlh = 4 * Number.EPSILON * (1 + Math.abs(lh));
  if (alpha < 1) {
    out.cdf = c1 + r.I0 / Math.PI;
    out.sf = r.I1 / Math.PI;
    out.cdfErr = (r.e0 + dlh * r.Ip) / Math.PI + 2 * Number.EPSILON * out.cdf + c1Err;
    out.sfErr = (r.e1 + dlh * r.Ip) / Math.PI + 2 * Number.EPSILON * out.sf;
  } else {
    out.cdf = c1 + r.I1 / Math.PI;
    out.sf = r.I0 / Math.PI;
    out.cdfErr = (r.e1 + dlh * r.Ip) / Math.PI + 2 * Number.EPSILON * out.cdf + c1Err;
    out.sfErr = (r.e0 + dlh * r.Ip) / Math.PI + 2 * Number.EPSILON * out.sf;
  }
  // the near-one rule's error is an estimate (its two rules' difference), and its split between I0 and I1 came out
  // below the actual error of the smaller tail against mpmath (alpha 0.99, 0.999, 1.001: F = 5e-4 off by 4e-18 against
  // a stated 2.5e-19, tests/fixtures/stable): cdf and sf each take the larger of the two
  if (near) {
    const m = Math.max(out.cdfErr, out.sfErr);
    out.cdfErr = m;
    out.sfErr = m;
  }
  clamp(out);
}

/** |log h| up to which alpha = 1 tries the shared panels (beyond, the point's own at its window) */
const PANELS_MAX_LH = 4000;
/** alpha = 1: the panels' relative bound above which the value comes from the Gauss rule far out (./stable-far.ts) */
const ONE_REL = 1e-11;

/**
 * The value of a rule whose error is only estimated (next to alpha = 1, far out at alpha = 1, the grid), with a bound
 * derived from panels with derived bounds: |value - exact| <= |value - panels| + panels' bound. Without panels (none
 * could be placed) the bound is Infinity: no estimate stands in for a bound.
 */
function derivedBound(est: StableIntegrals, pan: StableIntegrals | null): StableIntegrals {
  if (!(pan && [pan.I0, pan.I1, pan.Ip, pan.e0, pan.e1, pan.ep].every(Number.isFinite))) {
    lastRoute = "none";
    return { ...est, e0: Infinity, e1: Infinity, ep: Infinity };
  }
  lastRoute = "compared";
  return {
    ...est,
    // (plus the difference's own rounding)
    e0: (Math.abs(est.I0 - pan.I0) + pan.e0) * (1 + 4 * Number.EPSILON) + Number.EPSILON * est.I0,
    e1: (Math.abs(est.I1 - pan.I1) + pan.e1) * (1 + 4 * Number.EPSILON) + Number.EPSILON * est.I1,
    ep: (Math.abs(est.Ip - pan.Ip) + pan.ep) * (1 + 4 * Number.EPSILON) + Number.EPSILON * est.Ip,
  };
}

function oneAt(beta: number, z: number, out: DirectPoint, dz: number) {
  // far out: the tail series with its derived remainder (./stable-one-tail.ts); z < 0 as -z with skewness -beta
  const ser = stableOneTail(z > 0 ? beta : -beta, Math.abs(z), ONE_REL, dz);
  if (ser) {
    out.pdf = ser.pdf;
    out.pdfErr = ser.pdfErr;
    const far = ser.sf;
    const near = 1 - ser.sf;
    const nearErr = ser.sfErr + Number.EPSILON * near;
    out.sf = z > 0 ? far : near;
    out.sfErr = z > 0 ? ser.sfErr : nearErr;
    out.cdf = z > 0 ? near : far;
    out.cdfErr = z > 0 ? nearErr : ser.sfErr;
    clamp(out);
    return;
  }
  const lh = (-Math.PI * z) / (2 * beta);
  const dl = (Math.PI * dz) / (2 * beta);
  // Gauss-Legendre panels in theta with derived bounds (./stable-panels.ts, their boxes tightened by ./stable-box.ts,
  // which also bounds log V up to the finite end of beta = 1): the shared ones for |log h| <= PANELS_MAX_LH (beyond, they
  // reach their cap of panels), else the point's own; where their bound is above ONE_REL (the rounding of log h + log V,
  // eps |log h| in v, grows with |log h|), the value of the Gauss rule far out (./stable-far.ts) or of the grid, bounded
  // by comparison
  let r = Math.abs(lh) <= PANELS_MAX_LH ? stableOnePanels(beta, lh, ONE_REL, dl) : null;
  if (!r) {
    let win = stableOneWindow(beta, lh, dl);
    // beta = 1 on its light side (finite end of log V): the low half fitted to exp(-e^v) at the end (./stable-light.ts)
    if (beta === 1 && !(win && within(win, ONE_REL))) win = stableOneLight(lh, dl) ?? win;
    r = win && within(win, ONE_REL) ? win : derivedBound(stableOneFar(beta, lh) ?? stableIntegrals(1, beta, lh), win);
  }
  const dlh = 4 * Number.EPSILON * (1 + Math.abs(lh));
  out.pdf = r.Ip / (2 * beta);
  out.pdfErr = r.ep / (2 * beta) + 4 * Number.EPSILON * out.pdf;
  out.cdf = r.I0 / Math.PI;
  out.sf = r.I1 / Math.PI;
  out.cdfErr = (r.e0 + dlh * r.Ip) / Math.PI + 2 * Number.EPSILON * out.cdf;
  out.sfErr = (r.e1 + dlh * r.Ip) / Math.PI + 2 * Number.EPSILON * out.sf;
  clamp(out);
}

function clamp(o: DirectPoint) {
  if (o.cdf > 1) o.cdf = 1;
  if (o.sf > 1) o.sf = 1;
  if (o.cdf < 0) o.cdf = 0;
  if (o.sf < 0) o.sf = 0;
  if (o.pdf < 0) o.pdf = 0;
}
