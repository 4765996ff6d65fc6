// The per-frequency error bounds of the quadrature severities' damped transforms (Node.dampedErrorAt, and the lognormal
// one-claim kernel's cfErrorAt for its log and rectangular routes): at every t from 1e-3 to 1e5 and every damping of the
// audit fixture, each route's value (at that t alone, and at t inside a long equispaced row: the batched routes) is
// within the bound at that t of the reference, mpmath at 30 digits by two turned rays per value
// (tests/fixtures/severity-cf/generate-audit.py). Values taken through the log carry the log-CF rounding the engine
// allows every value besides (lib/cf/invert/part.ts cfRelError, 8 units). The bound never exceeds the constant
// cfAbsError and falls with t (it must, or it would carry nothing the constant does not).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { lognormal } from "@/lib/cf/families/lognormal";
import { weibull } from "@/lib/cf/families/numeric";
import { cfRelError } from "@/lib/cf/invert/part";
import { scaledSeverityKernel } from "@/lib/cf/severity-kernel-scale";
import { burr } from "@/lib/cf/families/burr";

interface Case { family: string; params: Record<string, number>; t: number; a: number; re: string; im: string; abs_diff: number }
const cases = (JSON.parse(readFileSync(new URL("../fixtures/severity-cf/audit.json", import.meta.url), "utf8")) as { cases: Case[] }).cases;

type Route = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => unknown;

/** the route's value at t alone and at t as entry 511 of the row (t / 512)(j + 1), j < 1024 (t / 512 exact) */
function valuesAt(f: Route, beta: number, t: number, log: boolean): { pr: number; pi: number; lr: number; li: number }[] {
  const out = [];
  for (const grid of [Float64Array.of(t), Float64Array.from({ length: 1024 }, (_, j) => (t / 512) * (j + 1))]) {
    const k = grid.length === 1 ? 0 : 511;
    const re = new Float64Array(grid.length);
    const im = new Float64Array(grid.length);
    f(beta, grid, re, im);
    if (!log) out.push({ pr: re[k], pi: im[k], lr: 0, li: 0 });
    else {
      const m = Math.exp(re[k]);
      out.push({ pr: m * Math.cos(im[k]), pi: m * Math.sin(im[k]), lr: re[k], li: im[k] });
    }
  }
  return out;
}

function check(label: string, cs: Case[], routes: [string, Route, boolean][], at: (beta: number, t: number) => number, whole: number) {
  const fails: string[] = [];
  const ratios: number[] = [];
  for (const c of cs) {
    const b = at(c.a, c.t);
    if (!(b <= whole)) fails.push(`${label} at ${c.t} + ${c.a} i: bound ${b} above the constant ${whole}`);
    for (const [name, f, log] of routes)
      for (const v of valuesAt(f, c.a, c.t, log)) {
        const d = Math.hypot(v.pr - Number(c.re), v.pi - Number(c.im));
        const mod = Math.hypot(v.pr, v.pi);
        const bound = b + (log && mod > 0 ? mod * cfRelError(8, v.lr, v.li, c.t, 0) : 0);
        if (d > 0) ratios.push(bound / d);
        if (!(d <= bound)) fails.push(`${label} ${name} at z = ${c.t} + ${c.a} i: ${v.pr} + ${v.pi} i, reference ${c.re} + ${c.im} i, difference ${d.toExponential(3)}, bound ${bound.toExponential(3)}`);
      }
  }
  expect(fails.length, fails.slice(0, 20).join("\n")).toBe(0);
  return ratios;
}

const groups = (family: string) => {
  const m = new Map<string, Case[]>();
  for (const c of cases.filter((q) => q.family === family)) m.set(JSON.stringify(c.params), [...(m.get(JSON.stringify(c.params)) ?? []), c]);
  return [...m.entries()];
};

describe("per-frequency CF error bounds of the quadrature severities (mpmath audit fixture)", () => {
  it("the fixture: two methods agree within 1e-16, lognormal, weibull, burr and log-logistic from t = 1e-3 to 1e5", () => {
    for (const f of ["lognormal", "weibull", "burr", "loglogistic"]) {
      const cs = cases.filter((c) => c.family === f);
      expect(cs.length, f).toBeGreaterThan(60);
      expect(Math.max(...cs.map((c) => c.t)), f).toBeGreaterThanOrEqual(1e5);
      for (const c of cs) expect(c.abs_diff, JSON.stringify(c)).toBeLessThanOrEqual(1e-16);
    }
  });

  it.each(groups("lognormal"))("lognormal %s: the damped transform and the one-claim kernel's routes", (p, cs) => {
    const { mu, sigma } = JSON.parse(p) as { mu: number; sigma: number };
    const node = lognormal(mu, sigma);
    const e = node.dampedErrorAt!;
    expect(e.cf).toBe(node.dampedLogCf);
    const k = node.severityKernel!(0.3, 0);
    const ratios = [
      ...check(`lognormal ${p}`, cs, [["damped", node.dampedLogCf!, true]], e.at, node.cfAbsError!),
      ...check(`lognormal kernel ${p}`, cs, [["kernel log", k.dampedLogCf, true], ["kernel rect", k.dampedCf!, false]], k.cfErrorAt!, k.cfAbsError),
    ];
    // the kernel scaled by 2 (a scaled compound's): its values at (beta, t) are the kernel's at (2 beta, 2 t)
    const s = scaledSeverityKernel(k, 2)!;
    const half = cs.map((c) => ({ ...c, t: c.t / 2, a: c.a / 2 }));
    check(`lognormal kernel x 2 ${p}`, half, [["scaled rect", s.dampedCf!, false]], s.cfErrorAt!, s.cfAbsError);
    // at t = 1e3 (beta 0) the bound is well below the constant
    expect(k.cfErrorAt!(0, 1e3)).toBeLessThan(k.cfAbsError / 10);
    expect(ratios.length).toBeGreaterThan(0);
  });

  it.each(groups("weibull"))("weibull %s: the damped transform", (p, cs) => {
    const { shape, scale } = JSON.parse(p) as { shape: number; scale: number };
    const node = weibull(shape, scale);
    const e = node.dampedErrorAt!;
    expect(e.cf).toBe(node.dampedLogCf);
    check(`weibull ${p}`, cs, [["damped", node.dampedLogCf!, true]], e.at, node.cfAbsError!);
    expect(e.at(0, 1e3)).toBeLessThan(node.cfAbsError! / 10);
  });

  // log-logistic(gamma, theta) is burr(1, gamma, theta) (Loss Models app. A.2.1), the same rule
  it.each([...groups("burr"), ...groups("loglogistic")])("burr / log-logistic %s: the damped transform", (p, cs) => {
    const q = JSON.parse(p) as { alpha?: number; gamma: number; theta: number };
    const node = burr(q.alpha ?? 1, q.gamma, q.theta, q.alpha === undefined ? "loglogistic" : "burr");
    const e = node.dampedErrorAt!;
    expect(e.cf).toBe(node.dampedLogCf);
    check(`burr ${p}`, cs, [["damped", node.dampedLogCf!, true]], e.at, node.cfAbsError!);
    expect(e.at(0, 1e3)).toBeLessThan(node.cfAbsError! / 10);
  });
});
