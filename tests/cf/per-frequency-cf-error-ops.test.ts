// Per-frequency CF error bounds carried through sums, mixtures, scalings, shifts and compounds
// (lib/cf/damped-error-carry.ts, lib/cf/compound.ts dampedRelErrorAt): the damped transforms of lognormal(0, 1) +
// weibull(1.5, 1), of that sum times 2 and moved by 1.5, of their 0.3 / 0.7 mixture, and of Poisson(2)-lognormal(0, 1) +
// weibull(1.5, 1), at the frequencies where the mpmath audit fixture has
// both severities (t from 1e-3 to 1e5, beta 0 and 1; tests/fixtures/severity-cf/generate-audit.py, 30 digits, two
// turned rays per value). References: the product, the weighted sum, and exp(lambda (phi - 1)) times phi (the Poisson
// pgf, common practice) of the fixture's values, formed in double: the few roundings of that (at most 16 eps of the
// value's modulus times 1 + |lambda (phi - 1)|) are allowed on top of the bound, with the log-CF rounding the engine
// allows every value (lib/cf/invert/part.ts cfRelError, the model's units).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile } from "@/lib/cf";
import { lognormal } from "@/lib/cf/families/lognormal";
import { weibull } from "@/lib/cf/families/numeric";
import { sumNode, mixNode, scaleNode, shiftNode } from "@/lib/cf/operators";
import { cfRelError } from "@/lib/cf/invert/part";

interface Case { family: string; params: Record<string, number>; t: number; a: number; re: string; im: string }
const cases = (JSON.parse(readFileSync(new URL("../fixtures/severity-cf/audit.json", import.meta.url), "utf8")) as { cases: Case[] }).cases;
const key = (c: Case) => `${c.t} ${c.a}`;
const ln = new Map(cases.filter((c) => c.family === "lognormal" && c.params.mu === 0 && c.params.sigma === 1).map((c) => [key(c), c]));
const wb = new Map(cases.filter((c) => c.family === "weibull" && c.params.shape === 1.5 && c.params.scale === 1).map((c) => [key(c), c]));
const common = [...ln.keys()].filter((k) => wb.has(k)).map((k) => k.split(" ").map(Number) as [number, number]);

type Cx = [number, number];
const cx = (c: Case): Cx => [Number(c.re), Number(c.im)];
const mul = (a: Cx, b: Cx): Cx => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const cexp = (a: Cx): Cx => [Math.exp(a[0]) * Math.cos(a[1]), Math.exp(a[0]) * Math.sin(a[1])];

function valueAt(f: (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => void, beta: number, t: number) {
  const re = new Float64Array(1);
  const im = new Float64Array(1);
  f(beta, Float64Array.of(t), re, im);
  const m = Math.exp(re[0]);
  return { v: [m * Math.cos(im[0]), m * Math.sin(im[0])] as Cx, lr: re[0], li: im[0] };
}

describe("per-frequency CF errors through sums, mixtures and compounds (mpmath audit fixture)", () => {
  it("the fixture holds both severities at 12 common frequencies, t up to 1e5, beta 0 and 1", () => {
    expect(common.length).toBeGreaterThanOrEqual(12);
    expect(Math.max(...common.map((c) => c[0]))).toBeGreaterThanOrEqual(1e5);
    expect(new Set(common.map((c) => c[1])).size).toBe(2);
  });

  it("sum and mixture nodes: within their per-frequency bounds, which are at most the constants and fall with t", () => {
    const parts = [lognormal(0, 1), weibull(1.5, 1)];
    const sum = sumNode(parts);
    const mix = mixNode([0.3, 0.7], parts);
    for (const [node, ref, label] of [
      [sum, (a: Cx, b: Cx) => mul(a, b), "sum"],
      [mix, (a: Cx, b: Cx): Cx => [0.3 * a[0] + 0.7 * b[0], 0.3 * a[1] + 0.7 * b[1]], "mixture"],
    ] as const) {
      const e = node.dampedErrorAt!;
      expect(e.cf, label).toBe(node.dampedLogCf);
      for (const [t, a] of common) {
        const want = ref(cx(ln.get(`${t} ${a}`)!), cx(wb.get(`${t} ${a}`)!));
        const { v, lr, li } = valueAt(node.dampedLogCf!, a, t);
        const d = Math.hypot(v[0] - want[0], v[1] - want[1]);
        const mod = Math.hypot(v[0], v[1]);
        const b = e.at(a, t);
        expect(b, `${label} bound at ${t}`).toBeLessThanOrEqual(node.cfAbsError!);
        const allow = b + mod * cfRelError(16, lr, li, t, 0) + 16 * Number.EPSILON * Math.hypot(...want);
        expect(d, `${label} at ${t} + ${a} i: ${v[0]} + ${v[1]} i, reference ${want[0]} + ${want[1]} i, difference ${d}, bound ${allow}`).toBeLessThanOrEqual(allow);
      }
      expect(e.at(0, 1e3), label).toBeLessThan(node.cfAbsError! / 10);
    }
  });

  it("the sum times 2 (at half the fixture's frequencies and damping) and moved by 1.5 (the reference times e^{(i t - beta) 1.5})", () => {
    const sum = sumNode([lognormal(0, 1), weibull(1.5, 1)]);
    const scaled = scaleNode(2, sum);
    const moved = shiftNode(1.5, sum);
    for (const [node, label] of [[scaled, "x 2"], [moved, "+ 1.5"]] as const) {
      const e = node.dampedErrorAt!;
      expect(e.cf, label).toBe(node.dampedLogCf);
      for (const [t, a] of common) {
        const prod = mul(cx(ln.get(`${t} ${a}`)!), cx(wb.get(`${t} ${a}`)!));
        const [tt, aa, want] = label === "x 2" ? [t / 2, a / 2, prod] : [t, a, mul(prod, cexp([-a * 1.5, t * 1.5]))];
        const { v, lr, li } = valueAt(node.dampedLogCf!, aa, tt);
        const d = Math.hypot(v[0] - want[0], v[1] - want[1]);
        const mod = Math.hypot(v[0], v[1]);
        const b = e.at(aa, tt);
        expect(b, `${label} bound at ${tt}`).toBeLessThanOrEqual(node.cfAbsError!);
        // the reference's own phase t 1.5 in double: within 4 |t 1.5| eps of its modulus
        const allow = b + mod * cfRelError(16, lr, li, tt, 0) + (16 + 4 * Math.abs(tt * 1.5)) * Number.EPSILON * Math.hypot(...want);
        expect(d, `${label} at ${tt} + ${aa} i: ${v[0]} + ${v[1]} i, reference ${want[0]} + ${want[1]} i, difference ${d}, bound ${allow}`).toBeLessThanOrEqual(allow);
      }
    }
  });

  it("Poisson(2)-lognormal(0, 1) + weibull(1.5, 1), compiled: within the carried absolute and relative bounds", () => {
    const m = compile({ sum: [{ compound: { count: { family: "poisson", lambda: 2 }, each: { family: "lognormal", mu: 0, sigma: 1 } } }, { family: "weibull", shape: 1.5, scale: 1 }] });
    expect(m.dampedAbsErrorAt && m.dampedRelErrorAt).toBeTruthy();
    const ulps = m.logCfUlps ?? 8 * Math.max(1, m.nodes);
    for (const [t, a] of common) {
      const p = cx(ln.get(`${t} ${a}`)!);
      const lam: Cx = [2 * (p[0] - 1), 2 * p[1]];
      const want = mul(cexp(lam), cx(wb.get(`${t} ${a}`)!));
      const { v, lr, li } = valueAt(m.dampedLogCf!, a, t);
      const d = Math.hypot(v[0] - want[0], v[1] - want[1]);
      const mod = Math.hypot(v[0], v[1]);
      const abs = m.dampedAbsErrorAt!(a, t);
      const rel = m.dampedRelErrorAt!(a, t);
      expect(abs).toBeLessThanOrEqual(m.cfAbsError ?? 0);
      expect(rel).toBeLessThanOrEqual(m.cfRelError ?? 0);
      const allow = abs + (rel + cfRelError(ulps, lr, li, t, 0)) * mod + 16 * Number.EPSILON * Math.hypot(...want) * (1 + Math.hypot(...lam));
      expect(d, `at ${t} + ${a} i: ${v[0]} + ${v[1]} i, reference ${want[0]} + ${want[1]} i, difference ${d}, bound ${allow}`).toBeLessThanOrEqual(allow);
    }
    expect(m.dampedRelErrorAt!(0, 1e3)).toBeLessThan((m.cfRelError ?? 0) / 10);
  });
});
