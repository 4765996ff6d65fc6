import { lgamma, lgammaErr } from "../families/special";
import type { EndpointKernels } from "./part";

/**
 * The aliasing of the endpoint kernels (./part.ts): they are taken out of the CF and added back in closed form, so the
 * mid-point sums of period T miss their images, sum_m |b_q| times the Gamma(power + q, rate) tail (cdf) or density (pdf)
 * at the images x + side m T on the kernel's open side (its law is zero on the other side, where the images lie beyond
 * `at` once x - T is). Bounded in absolute value with Gamma(s, z) <= z^(s-1) e^(-z) / (1 - (s - 1)/z) for s >= 1,
 * z > s - 1 (t^(s-1) <= z^(s-1) e^((s-1)(t-z)/z), log t <= log z + (t - z)/z), and <= z^(s-1) e^(-z) for s < 1
 * (t^(s-1) <= z^(s-1)); the first IMAGES images one by one, the rest by a geometric series (the ratio of consecutive
 * bounds at most e^(-rate T) (1 + rate T/z)^|s - 1|, falling in z). Infinity where an image on the closed side is not
 * beyond `at`. The stop-loss kind (the expected shortfall's E|X - q| sums, with their factor 2, as the residuals' own
 * stop-loss kinds): per image the Gamma(s, rate) law's E[(Y - d)^+] = int_d^inf Q(s, rate y) dy = (s Q(s + 1, z) - z Q(s, z))
 * / rate <= s Q(s + 1, z) / rate (z = rate d), the same tail bound at s + 1.
 */
const IMAGES = 8;
const U = Number.EPSILON;

function upper(s: number, z: number, pdf: boolean): number {
  const lg = lgamma(s) - lgammaErr(s) - 4 * U * Math.abs(lgamma(s));
  const l = (s - 1) * Math.log(z) - z - lg;
  const v = Math.exp(l + 8 * U * (Math.abs(l) + z + 2));
  if (pdf) return v;
  if (s < 1) return v;
  const den = 1 - (s - 1) / z;
  return den > 0 ? v / den : Infinity;
}

export function kernelAliasing(ks: readonly EndpointKernels[], xLo: number, xHi: number, T: number): { cdf: number; pdf: number; stopLoss: number } {
  let cdf = 0;
  let pdf = 0;
  let sl = 0;
  for (const k of ks) {
    // the nearest image on the open side, its distance past `at` (inward by a few ulps of the points)
    const y = k.side === 1 ? xLo + T : xHi - T;
    const d1 = k.side * (y - k.at) - 8 * U * (Math.abs(y) + Math.abs(k.at) + T);
    // the closed side: images x -+ m T must lie beyond `at` (there the kernel's law is 0 or 1 - its mass... both zero
    // in the aliasing once outside: F = 0 below at for side 1, S = 0 above at for side -1)
    const yc = k.side === 1 ? xHi - T : xLo + T;
    if (!(d1 > 0) || !(k.side * (yc - k.at) < 0)) return { cdf: Infinity, pdf: Infinity, stopLoss: Infinity };
    const tau = k.rate * T;
    for (let q = 0; q < k.b.length; q++) {
      const s = k.power + q;
      const b = Math.abs(k.b[q]);
      let c = 0;
      let p = 0;
      let e = 0;
      for (let m = 0; m < IMAGES; m++) {
        const z = k.rate * (d1 + m * T);
        c += upper(s, z, false);
        p += k.rate * upper(s, z, true);
        e += (s / k.rate) * upper(s + 1, z, false);
      }
      const z9 = k.rate * (d1 + IMAGES * T);
      const ratio = Math.exp(-tau) * Math.pow(1 + tau / z9, Math.abs(s - 1));
      // the stop-loss bounds' ratio, with the power s
      const ratioE = Math.exp(-tau) * Math.pow(1 + tau / z9, s);
      if (!(ratio < 1) || !(ratioE < 1)) return { cdf: Infinity, pdf: Infinity, stopLoss: Infinity };
      c += upper(s, z9, false) / (1 - ratio);
      p += (k.rate * upper(s, z9, true)) / (1 - ratio);
      e += ((s / k.rate) * upper(s + 1, z9, false)) / (1 - ratioE);
      cdf += b * c;
      pdf += b * p;
      sl += b * e;
    }
  }
  return { cdf: cdf * (1 + 1e-12), pdf: pdf * (1 + 1e-12), stopLoss: 2 * sl * (1 + 1e-12) };
}
