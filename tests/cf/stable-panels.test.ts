// The pieces of the derived quadrature bound of lib/cf/direct/stable-panels.ts: the Gauss-Legendre rule against closed
// forms, and the rectangle bounds on log V (alpha = 1) against log V evaluated at complex points from its closed form
// (Nolan 1997, Theorem 1: alpha = 1: V(theta) = (2/pi) ((pi/2 + beta theta) / cos theta) exp((pi/2 + beta theta) tan(theta) / beta);
// alpha != 1: V(theta) = cos(alpha theta0)^(1/(alpha-1)) (cos theta / sin(alpha (theta0 + theta)))^(alpha/(alpha-1))
// cos(alpha theta0 + (alpha - 1) theta) / cos theta, theta0 = atan(beta tan(pi alpha / 2)) / alpha).
import { describe, expect, it } from "vitest";
import { gaussLegendre } from "@/lib/cf/direct/stable-panel-store";
import { oneBox } from "@/lib/cf/direct/stable-far";
import { alphaTightBox, oneTightBox } from "@/lib/cf/direct/stable-box";
import { stableSide, type StableSide } from "@/lib/cf/direct/stable-kernel";
import { close } from "./model-assert";

describe("Gauss-Legendre rule of the panels", () => {
  it("integrates x^(2k) over [-1, 1] to 2 / (2k + 1) for 2k up to 2n - 2 (exact for degree 2n - 1)", () => {
    const { x, w } = gaussLegendre();
    const n = x.length;
    for (let k = 0; 2 * k <= 2 * n - 2; k++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += w[i] * x[i] ** (2 * k);
      close(s, 2 / (2 * k + 1), { abs: 4e-15 }, `n = ${n}: integral of x^${2 * k} over [-1, 1] (closed form 2/(2k+1))`);
    }
  });

  it("stays within Trefethen's bound (ATAP Thm 19.3) for 1/(x - 2), analytic inside E_rho for rho < 2 + sqrt(3)", () => {
    const { x, w } = gaussLegendre();
    const n = x.length;
    let s = 0;
    for (let i = 0; i < n; i++) s += w[i] / (x[i] - 2);
    // closed form: log(1/3)
    const exact = Math.log(1 / 3);
    // on E_rho the distance to 2 is at least 2 - (rho + 1/rho)/2
    const rho = 3;
    const M = 1 / (2 - (rho + 1 / rho) / 2);
    const bound = ((64 / 15) * M * rho ** (-2 * n)) / (rho * rho - 1);
    const err = Math.abs(s - exact);
    if (!(err <= bound + 1e-15)) expect.fail(`error ${err} above the bound ${bound}`);
  });
});

// complex helpers for the closed form (re, im pairs)
type C = [number, number];
const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const div = (a: C, b: C): C => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
const sin = (z: C): C => [Math.sin(z[0]) * Math.cosh(z[1]), Math.cos(z[0]) * Math.sinh(z[1])];
const cos = (z: C): C => [Math.cos(z[0]) * Math.cosh(z[1]), -Math.sin(z[0]) * Math.sinh(z[1])];
const log = (z: C): C => [Math.log(Math.hypot(z[0], z[1])), Math.atan2(z[1], z[0])];

/** log V at theta = end -/+ u (u complex), from the closed form; the sum of principal logs is the branch of the real interval */
function logV(beta: number, from: 0 | 1, u: C): C {
  const theta: C = from === 0 ? [-Math.PI / 2 + u[0], u[1]] : [Math.PI / 2 - u[0], -u[1]];
  const P: C = [Math.PI / 2 + beta * theta[0], beta * theta[1]];
  const tan = div(sin(theta), cos(theta));
  const lp = log(P);
  const lc = log(cos(theta));
  const t = mul(P, tan);
  return [Math.log(2 / Math.PI) + lp[0] - lc[0] + t[0] / beta, lp[1] - lc[1] + t[1] / beta];
}

describe("rectangle bounds on log V (alpha = 1)", () => {
  it.each([
    ["the factor-by-factor bounds (oneBox)", oneBox],
    ["the centred second-order enclosure alone (stable-box.ts)", (beta: number) => oneTightBox(beta, () => false)],
    ["the two intersected (the panels' box)", (beta: number) => oneTightBox(beta, oneBox(beta))],
  ] as const)("%s hold at points inside random rectangles (seeded), both ends, beta from 0.01 to 1", (_name, boxOf) => {
    let seed = 12345;
    const rnd = () => {
      seed = (seed * 1103515245 + 12345) % 2147483648;
      return seed / 2147483648;
    };
    const out = { rLo: 0, rHi: 0, iMax: 0 };
    let checked = 0;
    for (const beta of [0.01, 0.1, 0.5, 0.9, 1]) {
      const box = boxOf(beta);
      for (let r = 0; r < 300; r++) {
        const from = (r & 1) as 0 | 1;
        // rectangles from near an end (u down to 1e-6) to the middle, of relative width up to one half; at the finite
        // low end of beta = 1 some reach across u = 0
        const x1 = beta === 1 && from === 0 && r % 4 === 0 ? -0.3 * rnd() : Math.exp(Math.log(1e-6) * rnd()) * 1.5;
        const x2 = Math.abs(x1) * (1 + 0.5 * rnd()) + 1e-7;
        const Y = (x2 - x1) * 2 * rnd();
        if (!box(from, x1, x2, Y, out)) continue;
        for (let k = 0; k < 20; k++) {
          const u: C = [Math.max(x1, 0) + (x2 - Math.max(x1, 0)) * rnd(), Y * (2 * rnd() - 1)];
          if (!(u[0] > 0)) continue;
          const lv = logV(beta, from, u);
          const tol = 1e-9 * (1 + Math.abs(lv[0]));
          if (!(lv[0] >= out.rLo - tol && lv[0] <= out.rHi + tol && Math.abs(lv[1]) <= out.iMax + 1e-9 * (1 + Math.abs(lv[0]))))
            expect.fail(
              `beta ${beta}, end ${from}, rectangle [${x1}, ${x2}] x [-${Y}, ${Y}] at u = ${u}: log V = ${lv} outside Re [${out.rLo}, ${out.rHi}], |Im| <= ${out.iMax}`,
            );
          checked++;
        }
      }
    }
    expect(checked).toBeGreaterThan(10000);
  });
});

/** log V for alpha != 1 at theta = the end `from` -/+ u (low end: -theta0 for alpha < 1, pi/2 for alpha > 1), closed form */
function logVa(alpha: number, beta: number, from: 0 | 1, u: C): C {
  const th0 = Math.atan(beta * Math.tan((Math.PI * alpha) / 2)) / alpha;
  const left = (from === 0) === alpha < 1;
  const theta: C = left ? [-th0 + u[0], u[1]] : [Math.PI / 2 - u[0], -u[1]];
  const e = 1 / (alpha - 1);
  const lc = log(cos(theta));
  const ls = log(sin([alpha * (th0 + theta[0]), alpha * theta[1]]));
  const lw = log(cos([alpha * th0 + (alpha - 1) * theta[0], (alpha - 1) * theta[1]]));
  const k = e * Math.log(Math.cos(alpha * th0));
  return [k + alpha * e * (lc[0] - ls[0]) + lw[0] - lc[0], alpha * e * (lc[1] - ls[1]) + lw[1] - lc[1]];
}

describe("rectangle bounds on log V (alpha != 1)", () => {
  it.each([
    ["the factor-by-factor bounds (stableSide's box)", (side: StableSide) => side.box!],
    ["the centred second-order enclosure alone (stable-box.ts)", (side: StableSide) => alphaTightBox(side, () => false)],
    ["the two intersected (the panels' box)", (side: StableSide) => alphaTightBox(side, side.box!)],
  ] as const)("%s hold at points inside random rectangles (seeded), both ends, finite ends included", (_name, boxOf) => {
    let seed = 777;
    const rnd = () => {
      seed = (seed * 1103515245 + 12345) % 2147483648;
      return seed / 2147483648;
    };
    const out = { rLo: 0, rHi: 0, iMax: 0 };
    let checked = 0;
    const laws = [[0.3, 0.5], [0.5, 1], [0.8, 0], [0.8, -0.6], [1.1, 0.4], [1.5, -1], [1.5, 0.7], [1.9, 0.9], [1.999, -1], [1.999, 1], [0.99, 0.3], [0.995, 1], [1.01, -1], [0.999, 0.5], [1.001, -0.5]];
    for (const [alpha, beta] of laws) {
      const side = stableSide(alpha, beta);
      const box = boxOf(side);
      for (let r = 0; r < 400; r++) {
        const from = (r & 1) as 0 | 1;
        // rectangles from near an end to the middle; at a finite end some reach across u = 0
        const x1 = r % 4 === 0 ? -0.3 * rnd() : Math.exp(Math.log(1e-6) * rnd()) * 0.5 * side.L;
        const x2 = Math.abs(x1) * (1 + 0.5 * rnd()) + 1e-7;
        const Y = (x2 - x1) * 2 * rnd();
        if (!box(from, x1, x2, Y, out)) continue;
        for (let k = 0; k < 20; k++) {
          const u: C = [Math.max(x1, 0) + (x2 - Math.max(x1, 0)) * rnd(), Y * (2 * rnd() - 1)];
          if (!(u[0] > 0)) continue;
          const lv = logVa(alpha, beta, from, u);
          const tol = 1e-9 * (1 + Math.abs(lv[0]));
          if (!(lv[0] >= out.rLo - tol && lv[0] <= out.rHi + tol && Math.abs(lv[1]) <= out.iMax + tol))
            expect.fail(
              `alpha ${alpha}, beta ${beta}, end ${from}, rectangle [${x1}, ${x2}] x [-${Y}, ${Y}] at u = ${u}: log V = ${lv} outside Re [${out.rLo}, ${out.rHi}], |Im| <= ${out.iMax}`,
            );
          checked++;
        }
      }
    }
    expect(checked).toBeGreaterThan(20000);
  });
});
