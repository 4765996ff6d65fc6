/**
 * Severity CFs by quadrature: the shared driver from phi at |t| to the log-CF, and the trapezoidal rule on a shifted
 * contour with its step set from the strip of analyticity (Trefethen & Weideman 2014, SIAM Review 56, sec. 5).
 * The families' own batched and damped variants (lognormal, weibull, pareto in ./numeric) use the same rule.
 */
import { sortedAnchor, unwrapFrom } from "../complex";
import { checkDeadline } from "../deadline";

/**
 * Shared driver: phi(t) for t > 0 from a per-t quadrature, phi(-t) = conj phi(t), phi(0) = 1; then log with the
 * imaginary part unwrapped along t (when t is sorted).
 */
export function fromPhi(t: Float64Array, re: Float64Array, im: Float64Array, phiPos: (x: number, out: Float64Array) => void) {
  const tmp = new Float64Array(2);
  for (let k = 0; k < t.length; k++) {
    if ((k & 255) === 0) checkDeadline("cf-quadrature");
    const x = t[k];
    if (x === 0) {
      re[k] = 0;
      im[k] = 0;
      continue;
    }
    phiPos(Math.abs(x), tmp);
    re[k] = Math.log(Math.hypot(tmp[0], tmp[1]));
    im[k] = (x < 0 ? -1 : 1) * Math.atan2(tmp[1], tmp[0]);
  }
  const anchor = sortedAnchor(t);
  if (anchor >= 0) unwrapFrom(im, anchor);
}

/**
 * A positive law written as X = A e^s, s with an analytic log-density L(s). For t > 0,
 * phi(t) = int exp(L(s) + i t A e^s) ds; the path is moved to Im s = theta (Cauchy's theorem), where the oscillating
 * factor decays like exp(-t A e^v sin theta), and the trapezoidal rule on the shifted line converges geometrically
 * in the step (Trefethen & Weideman 2014, SIAM Review 56, sec. 5). Step h from a strip of half-width `strip`
 * about the path with |integrand| <= e^logM: error <= 2 e^logM / (e^{2 pi strip / h} - 1) <= 1e-17.
 */
export interface Contour {
  theta: number;
  strip: number;
  logM: number;
  /** log-density of s at (v + i theta) into out */
  L(v: number, out: Float64Array): void;
  /** path ends for a given a = t A: beyond them the integrand is below 1e-18 */
  range(a: number): [number, number];
}

export function contourPhi(c: Contour): (a: number, out: Float64Array) => void {
  const h = (2 * Math.PI * c.strip) / (40 + Math.max(0, c.logM));
  const sn = Math.sin(c.theta);
  const cs = Math.cos(c.theta);
  const l = new Float64Array(2);
  return (a, out) => {
    const [lo, hi] = c.range(a);
    let sr = 0;
    let si = 0;
    const n = Math.ceil((hi - lo) / h);
    for (let j = 0; j <= n; j++) {
      const v = lo + j * h;
      const ev = Math.exp(v);
      c.L(v, l);
      const mr = l[0] - a * ev * sn;
      if (mr < -800) continue;
      const mag = Math.exp(mr);
      const ph = l[1] + a * ev * cs;
      sr += mag * Math.cos(ph);
      si += mag * Math.sin(ph);
    }
    out[0] = sr * h;
    out[1] = si * h;
  };
}

