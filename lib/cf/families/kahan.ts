/**
 * Compensated (Kahan) complex sum of terms m e^{i p}: each addition's rounding is carried into the next, so a sum of
 * n terms rounds by 2 u + O(n u^2) of the sum of the moduli per component (Higham, Accuracy and Stability of
 * Numerical Algorithms, 2nd ed., Alg. 4.2 and eq. (4.8)). One accumulator per rule, reset per frequency; the node
 * loops of the severity CFs call addPolar, which V8 inlines.
 */
export class KahanComplex {
  re = 0;
  im = 0;
  private cr = 0;
  private ci = 0;

  reset(): void {
    this.re = 0;
    this.im = 0;
    this.cr = 0;
    this.ci = 0;
  }

  /** adds mag (cos ph + i sin ph) */
  addPolar(mag: number, ph: number): void {
    const yr = mag * Math.cos(ph) - this.cr;
    const tr = this.re + yr;
    this.cr = tr - this.re - yr;
    this.re = tr;
    const yi = mag * Math.sin(ph) - this.ci;
    const ti = this.im + yi;
    this.ci = ti - this.im - yi;
    this.im = ti;
  }
}
