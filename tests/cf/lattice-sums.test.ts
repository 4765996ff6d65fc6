// Sums of a continuous law and a lattice term (normal + Poisson, Student t + binomial, gamma + Poisson), by both routes:
// summed over the lattice points (lib/cf/direct/lattice-sum.ts, the route compile picks) and inverted from the CF (the
// same model without its direct law). Their CF is almost periodic, |phi(2 pi k)| held up by the lattice terms, so
// sampling |phi| a few times per octave under-states the inversion's truncation error (the engine bounds it with a
// majorant of |phi| instead, lib/cf/majorant.ts). pdf, cdf, sf at points and quantiles at 0.01, 0.5, 0.99 against mpmath at 30
// digits (tests/fixtures/lattice-sums/generate.py: exact convolution of the lattice atoms with the continuous law, its
// cdf by a special function or quadrature and checked by a second quadrature). Each answer must lie within its own
// reported bound (honest) and meet the accuracy aimed at (cdf 1e-9 absolute, quantiles 1e-7 relative).
import { afterAll, describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile, density, quantiles } from "@/lib/cf";
import { close, record, worst } from "./model-assert";
import type { CompiledModel } from "@/lib/cf/types";

/** the compiled model by the route named: "direct" as compiled (summed over the lattice points), "inverted" without it */
function routed(model: unknown, route: "direct" | "inverted"): CompiledModel {
  const c = compile(model as never);
  if (route === "direct") {
    expect(c.direct, "the sum is answered over its lattice points").toBeDefined();
    return c;
  }
  const { direct: _direct, ...rest } = c;
  return { ...rest, notes: c.notes } as CompiledModel;
}
const ROUTES = ["direct", "inverted"] as const;

interface Case {
  name: string;
  model: unknown;
  points: { x: number; pdf: string; cdf: string; sf: string; cdfErr: number }[];
  levels: { p: number; q: string; qErr: number }[];
}
const fixture = JSON.parse(readFileSync(new URL("../fixtures/lattice-sums/lattice-sums.json", import.meta.url), "utf8")) as { cases: Case[] };

afterAll(() => console.log("worst errors vs mpmath (and error / reported bound):", JSON.stringify(worst)));

describe("continuous law plus lattice terms vs mpmath convolution (tests/fixtures/lattice-sums)", () => {
  it.each(fixture.cases.flatMap((c) => ROUTES.map((route) => [c.name, route, c] as const)))("%s (%s): points", (_name, route, c) => {
    const r = density(routed(c.model, route), { x: c.points.map((p) => p.x) });
    const e = r.diagnostics.error;
    c.points.forEach((p, i) => {
      const what = `${c.name} at x = ${p.x} (bounds ${JSON.stringify(e)})`;
      for (const [q, got, want, bound] of [
        ["cdf", r.cdf[i], Number(p.cdf), e.cdf],
        ["sf", r.sf[i], Number(p.sf), e.cdf],
        ["pdf", r.pdf![i], Number(p.pdf), e.pdf],
      ] as const) {
        const d = Math.abs(got - want);
        expect(d, `${what}: ${q} ${got} vs ${want}, reported bound ${bound}`).toBeLessThanOrEqual(bound + p.cdfErr);
        record(`${c.name} ${q} error / bound`, d / bound);
      }
      // the route over the lattice points bounds every point on its own: each value within its point bound too
      const pe = r.diagnostics.pointError;
      if (route === "direct") {
        expect(pe, "point bounds").toBeDefined();
        for (const [q, got, want, bound] of [
          ["cdf", r.cdf[i], Number(p.cdf), pe!.cdf[i]],
          ["sf", r.sf[i], Number(p.sf), pe!.sf[i]],
          ["pdf", r.pdf![i], Number(p.pdf), pe!.pdf[i]],
        ] as const) {
          expect(Math.abs(got - want), `${what}: ${q} ${got} vs ${want}, point bound ${bound}`).toBeLessThanOrEqual(bound + p.cdfErr);
          record(`${c.name} ${q} error / point bound`, Math.abs(got - want) / bound);
        }
      }
      close(r.cdf[i], Number(p.cdf), { abs: 1e-9 }, `${what}: cdf`);
      close(r.sf[i], Number(p.sf), { abs: 1e-9 }, `${what}: sf`);
    });
  });

  it.each(fixture.cases.flatMap((c) => ROUTES.map((route) => [c.name, route, c] as const)))("%s (%s): quantiles", (_name, route, c) => {
    const r = quantiles(routed(c.model, route), c.levels.map((l) => l.p));
    c.levels.forEach((l, i) => {
      const q = Number(l.q);
      const d = Math.abs(r.x[i] - q);
      const bound = r.diagnostics.quantileError[i];
      expect(d, `${c.name} at p = ${l.p}: quantile ${r.x[i]} vs ${q}, reported bound ${bound}`).toBeLessThanOrEqual(bound + l.qErr);
      close(r.x[i], q, { rel: 1e-7, abs: 1e-7 }, `${c.name} at p = ${l.p}: quantile`);
      record(`${c.name} quantile error / bound`, d / bound);
    });
  });
});
