// Compounds of pareto and lomax claims: the density's truncation bound is derived (no "sampled" note). The remainder
// bound's slowest part, the kernels' s^-1 residue, is split off and bounded through its total variation
// (lib/cf/compound-remainder-terms.ts jumpSplit, lib/cf/invert/damped-psi.ts jumpTail). References: the mpmath fixture
// tests/fixtures/compound/endpoint-density.json (generate_endpoint_density.py: P_N(L_X(s)) with the generalised
// exponential integral, DLMF 8.19.2, inverted by de Hoog's and Talbot's methods at 40 digits, the methods' difference
// written per point; closed form p_1 f_X below two claims' reach). Every density value must lie within its stated bound.
import { describe, expect, it } from "vitest";
import fixture from "../fixtures/compound/endpoint-density.json";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import type { Model } from "@/lib/cf/types";

type Case = { model: Model; atom0: number; points: { x: number; pdf: number; methodsDifference: number }[] };
const cases = fixture.cases as unknown as Case[];

describe("compounds of pareto and lomax claims: derived density bounds", () => {
  it.each(cases.map((c) => [JSON.stringify(c.model), c] as const))("%s at the fixture's points", (_name, c) => {
    const m = compile(c.model);
    const d = density(m, { x: c.points.map((p) => p.x) });
    const notes = d.diagnostics.notes.join(" ");
    expect(notes).not.toContain("sampled at 8 frequencies");
    expect(notes).toContain("derived bounds on the transform's size");
    c.points.forEach((p, i) => {
      const bound = d.diagnostics.pointError?.pdf[i] ?? d.diagnostics.error.pdf;
      const err = Math.abs(d.pdf![i] - p.pdf) - p.methodsDifference - 1e-16 * p.pdf;
      if (!(err <= bound)) expect.fail(`pdf at ${p.x}: ${d.pdf![i]} vs ${p.pdf}, bound ${bound}`);
    });
    expect(d.diagnostics.error.pdf).toBeLessThan(1e-8);
  });

  it.each(cases.map((c) => [JSON.stringify(c.model), c] as const))("%s on a grid through the fixture's points", (_name, c) => {
    const m = compile(c.model);
    const top = c.points[c.points.length - 1].x;
    const d = density(m, { grid: { from: 0, to: top, count: Math.round(top / 0.05) + 1 } });
    const notes = d.diagnostics.notes.join(" ");
    expect(notes).not.toContain("sampled at 8 frequencies");
    expect(notes).toContain("derived bounds on the transform's size");
    let matched = 0;
    for (const p of c.points) {
      const i = d.x.findIndex((x) => Math.abs(x - p.x) <= 1e-13 * p.x);
      if (i < 0) continue;
      matched++;
      const bound = d.diagnostics.pointError?.pdf[i] ?? d.diagnostics.error.pdf;
      // the node's own distance from the fixture's x, times the density's slope there (at most 10 per unit here)
      const err = Math.abs(d.pdf![i] - p.pdf) - p.methodsDifference - 1e-16 * p.pdf - 10 * Math.abs(d.x[i] - p.x);
      if (!(err <= bound)) expect.fail(`pdf at ${p.x}: ${d.pdf![i]} vs ${p.pdf}, bound ${bound}`);
    }
    expect(matched).toBeGreaterThanOrEqual(c.points.length - 1);
  });
});
