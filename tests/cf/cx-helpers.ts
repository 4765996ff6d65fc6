// Complex arithmetic, compensated summation and a CF-at-points helper for the family CF tests.
import { compile } from "@/lib/cf";

export type Cx = [number, number];
export const cmul = (a: Cx, b: Cx): Cx => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
export const cdiv = (a: Cx, b: Cx): Cx => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
export const cexp = (a: Cx): Cx => [Math.exp(a[0]) * Math.cos(a[1]), Math.exp(a[0]) * Math.sin(a[1])];
export const clog = (a: Cx): Cx => [Math.log(Math.hypot(a[0], a[1])), Math.atan2(a[1], a[0])];
export const cpow = (a: Cx, p: number): Cx => {
  const l = clog(a);
  return cexp([p * l[0], p * l[1]]);
};
export const csqrt = (a: Cx): Cx => cpow(a, 0.5);

/** Compensated summation (Neumaier 1974) so that the brute-force references are not limited by rounding. */
export class Neumaier {
  private s = 0;
  private c = 0;
  add(x: number) {
    const t = this.s + x;
    this.c += Math.abs(this.s) >= Math.abs(x) ? this.s - t + x : x - t + this.s;
    this.s = t;
  }
  get value() {
    return this.s + this.c;
  }
}

export function cfAt(model: unknown, ts: number[]): Cx[] {
  const c = compile(model);
  const t = Float64Array.from(ts);
  const re = new Float64Array(ts.length);
  const im = new Float64Array(ts.length);
  c.cf(t, re, im);
  return ts.map((_, k) => [re[k], im[k]]);
}
