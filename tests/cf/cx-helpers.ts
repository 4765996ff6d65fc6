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

/**
 * A severity's damped transform E exp(i z X), z = t + i beta, on the row t = 0.1, 0.2, ..., 8 (equispaced, as the damped
 * route asks) and at each frequency alone, against reference values at row indices (t = (index + 1) / 10): each within
 * the node's stated CF error.
 */
export function checkDampedRow(
  node: { cfAbsError?: number; dampedLogCf?: (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => void },
  beta: number,
  refs: { index: number; re: string; im: string }[],
  expect: (v: number, msg: string) => { toBeLessThanOrEqual(x: number): void },
  tolAt?: (t: number) => number,
): void {
  const stated = node.cfAbsError!;
  const t = Float64Array.from({ length: 80 }, (_, i) => (i + 1) / 10);
  const re = new Float64Array(t.length);
  const im = new Float64Array(t.length);
  node.dampedLogCf!(beta, t, re, im);
  const one = { re: new Float64Array(1), im: new Float64Array(1) };
  const value = (r: Float64Array, i: Float64Array, k: number): Cx => cexp([r[k], i[k]]);
  for (const c of refs) {
    const want = [Number(c.re), Number(c.im)];
    // the node's per-frequency bound where the test passes it (at most the constant stated one)
    const tol = tolAt ? tolAt(t[c.index]) : stated;
    expect(tol, `per-frequency bound at t = ${t[c.index]} above the stated ${stated}`).toBeLessThanOrEqual(stated);
    const [pr, pi] = value(re, im, c.index);
    const diff = Math.hypot(pr - want[0], pi - want[1]);
    expect(diff, `row, t = ${t[c.index]}: phi = ${pr} + ${pi} i, expected ${c.re} + ${c.im} i, difference ${diff}, stated ${tol}`).toBeLessThanOrEqual(tol);
    node.dampedLogCf!(beta, Float64Array.of(t[c.index]), one.re, one.im);
    const [qr, qi] = value(one.re, one.im, 0);
    const d1 = Math.hypot(qr - want[0], qi - want[1]);
    expect(d1, `alone, t = ${t[c.index]}: phi = ${qr} + ${qi} i, expected ${c.re} + ${c.im} i, difference ${d1}, stated ${tol}`).toBeLessThanOrEqual(tol);
  }
}
