// Compounds of exponential claims at points: the density's truncation past the cut-off is F's tail integrated plus the
// total variation of G, the kernels' weights' rounding (lib/cf/invert/damped-envelope.ts derivedEnvelope's split, from
// lib/cf/compound.ts gammaRemainderJump), instead of G's 1 / t size integrated to the last probe (a log-divergent term:
// 3e-13 at every cut-off for NB(3, 0.2)-exponential(1), whose variation is 6.4e-14). Reference:
// tests/fixtures/compound/compound.json (generate.py beside it: the Erlang mixture over the claim count, mpmath 32 digits).
// Every density within its stated bound; asked for 1e-12, the bounds stay below 4e-13 (NB(3, 0.2), x <= 24) and 2e-13
// (Poisson(0.1), x <= 0.4), under what the integrated 1 / t part alone gave at the default tolerance (5.4e-13 to 9.2e-13,
// 4.0e-13 to 4.7e-13). At the default tolerance the plan may take any damping whose bound meets 1e-10 at the least
// terms (a damping already probed costs nothing: lib/cf/invert/damped-transform.ts), so the ceiling is checked at 1e-12,
// where the plan has to reach for a small bound; it includes the severity's own rounding (lib/cf/arg-rounding.ts).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import type { Model } from "@/lib/cf/types";

interface Case {
  model: Model;
  points: { x: number; pdf: number }[];
}
const fixture = JSON.parse(readFileSync(join(__dirname, "../fixtures/compound/compound.json"), "utf8")) as { exponential: Case[] };

const cases: { count: object; upTo: number; below: number }[] = [
  { count: { family: "negative_binomial", r: 3, p: 0.2 }, upTo: 24, below: 4e-13 },
  { count: { family: "poisson", lambda: 0.1 }, upTo: 0.4, below: 2e-13 },
];

describe("compounds of exponential claims: the density bound from the remainder's split (compound.json, mpmath)", () => {
  it.each(cases)("$count", ({ count, upTo, below }) => {
    const c = fixture.exponential.find((k) => JSON.stringify((k.model as { compound: { count: object } }).compound.count) === JSON.stringify(count))!;
    expect(c, "the fixture holds the case").toBeDefined();
    const r = density(compile(c.model), { x: c.points.map((p) => p.x), tolerance: 1e-12 });
    const pe = r.diagnostics.pointError!.pdf;
    c.points.forEach((p, i) => {
      const d = Math.abs(r.pdf![i] - p.pdf);
      expect(d, `pdf(${p.x}): got ${r.pdf![i]}, reference ${p.pdf}, bound ${pe[i]}`).toBeLessThanOrEqual(pe[i]);
      if (p.x <= upTo) expect(pe[i], `pdf(${p.x}) bound`).toBeLessThan(below);
    });
  });
});
