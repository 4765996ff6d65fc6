// Sums of a power-tailed term and a lighter one (Student t + weibull, Student t + normal, pareto + normal): seven
// quantiles and expected shortfall through the power-tail inversion, against mpmath numerical convolution at 24 digits
// (tests/fixtures/sums/generate.py: each value by two convolutions with the roles of the terms swapped); and sums led by
// a stable term (with normal, uniform, Laplace, gamma terms, or a second stable), against mpmath Fourier inversion of
// their closed-form CF at 20 digits, E|X - q| at 30 (tests/fixtures/sums/generate_cf.py: tanh-sinh, checked by a second
// quadrature). Each answer must lie within its own reported bound (honest), decided by a reference whose own uncertainty
// is at most a tenth of that bound, and meet the accuracy aimed at (quantiles 1e-7 relative, ES 1e-6).
import { afterAll, describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile, quantiles } from "@/lib/cf";
import { close, record, worst } from "./model-assert";

interface Level {
  p: string;
  x: string;
  x_check: number;
  es: string;
  es_check: number;
}
interface Case {
  name: string;
  model: unknown;
  levels: Level[];
}
const load = (name: string) => (JSON.parse(readFileSync(new URL(`../fixtures/sums/${name}`, import.meta.url), "utf8")) as { cases: Case[] }).cases;
const fixture = { cases: [...load("sums.json"), ...load("cf-sums.json")] };

afterAll(() => console.log("worst errors vs mpmath convolution (and error / reported bound):", JSON.stringify(worst)));

describe("sums with power tails vs mpmath convolution and CF inversion (tests/fixtures/sums)", () => {
  it.each(fixture.cases.map((c) => [c.name, c] as const))("%s", (_name, c) => {
    const p = c.levels.map((l) => Number(l.p));
    const r = quantiles(compile(c.model as never), p, { expectedShortfall: true });
    c.levels.forEach((l, i) => {
      const x = Number(l.x);
      const es = Number(l.es);
      const what = `${c.name} at p = ${l.p}`;
      const qErr = r.diagnostics.quantileError[i];
      const esErr = r.diagnostics.expectedShortfallError![i];
      const dq = Math.abs(r.x[i] - x);
      const de = Math.abs(r.expectedShortfall![i] - es);
      // the reference can decide whether the bounds hold: its own uncertainty (x_check, es_check) is at most a tenth of them
      expect(l.x_check, `${what}: reference quantile uncertainty vs reported bound ${qErr}`).toBeLessThanOrEqual(qErr / 10);
      expect(l.es_check, `${what}: reference ES uncertainty vs reported bound ${esErr}`).toBeLessThanOrEqual(esErr / 10);
      // the reported bounds hold
      expect(dq, `${what}: quantile ${r.x[i]} vs ${x}, reported bound ${qErr}`).toBeLessThanOrEqual(qErr + l.x_check);
      expect(de, `${what}: ES ${r.expectedShortfall![i]} vs ${es}, reported bound ${esErr}`).toBeLessThanOrEqual(esErr + l.es_check);
      // and the accuracy aimed at
      close(r.x[i], x, { rel: 1e-7, abs: 1e-7 }, `${what}: quantile`);
      close(r.expectedShortfall![i], es, { rel: 1e-6 }, `${what}: ES`);
      record(`${c.name} quantile rel`, dq / Math.max(1, Math.abs(x)));
      record(`${c.name} ES rel`, de / Math.abs(es));
      record(`${c.name} quantile error / bound`, dq / qErr);
      record(`${c.name} ES error / bound`, de / esErr);
      record(`${c.name} reference ES uncertainty / bound`, l.es_check / esErr);
    });
  });
});
