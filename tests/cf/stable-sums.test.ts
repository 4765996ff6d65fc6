// Sums of stable terms of one index, evaluated as the one stable law they add up to (lib/cf/stable-fold.ts), against
// tests/fixtures/stable-sums/generate.py (mpmath, 30 digits: the Gil-Pelaez inversion of the product of the terms' own
// CFs in the body, which does not use the folding rule, checked against the folded law by Nolan's integral or the
// Cauchy/normal closed form; in the tails the folded law's integral against its series). Every value within its own
// per-point bound and within 1e-6 relative; quantiles within their bound and 1e-7 relative.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile, density, moments, quantiles } from "@/lib/cf";
import type { Model } from "@/lib/cf/types";

interface Case {
  name: string;
  model: Model;
  folded: { alpha: number; beta: number; scale: string; loc: string };
  points: { x: number; pdf: string; cdf: string; sf: string; source: string; check: string | null; rel_diff: number | null }[];
  levels: { p: number; x: string; source: string; check: string; x_check: number }[];
}
const fixture = JSON.parse(readFileSync(new URL("../fixtures/stable-sums/stable-sums.json", import.meta.url), "utf8")) as { cases: Case[] };
const SOURCE = "tests/fixtures/stable-sums/stable-sums.json (mpmath: product-CF Gil-Pelaez inversion, folded Nolan integral, closed forms, tail series)";
const REL = 1e-6;

describe("sums of stable terms of one alpha: the folded law vs mpmath", () => {
  it("the fixture's two methods agree (cross-check written by the generator)", () => {
    let checked = 0;
    for (const k of fixture.cases) {
      for (const p of k.points) {
        if (p.rel_diff === null) continue;
        checked++;
        if (!(p.rel_diff <= 1e-10)) expect.fail(`${k.name} at x = ${p.x}: ${p.source} vs ${p.check} differ by ${p.rel_diff}`);
      }
      for (const l of k.levels) if (!(Math.abs(l.x_check) <= 1e-12 * Math.max(1, Math.abs(Number(l.x))))) expect.fail(`${k.name} p = ${l.p}: check moves the quantile by ${l.x_check}`);
    }
    expect(checked).toBeGreaterThan(30);
  });

  for (const k of fixture.cases) {
    it(`${k.name}: pdf, cdf, sf within their per-point bounds`, () => {
      const m = compile(k.model);
      expect(m.direct, "the sum has a direct law").toBeDefined();
      const xs = k.points.map((p) => p.x);
      const r = density(m, { x: xs });
      const pe = r.diagnostics.pointError!;
      expect(pe, "per-point bounds").toBeDefined();
      xs.forEach((x, i) => {
        const p = k.points[i];
        const rows: [string, number, number, number][] = [
          ["pdf", r.pdf![i], Number(p.pdf), pe.pdf[i]],
          ["cdf", r.cdf[i], Number(p.cdf), pe.cdf[i]],
          ["sf", r.sf[i], Number(p.sf), pe.sf[i]],
        ];
        for (const [what, v, ref, bound] of rows) {
          const diff = Math.abs(v - ref);
          const tol = what === "pdf" ? REL * ref : Math.max(REL * ref, Math.min(1e-9, REL));
          const msg = `${k.name} ${what} at x = ${x}: value ${v}, expected ${ref}, difference ${diff}, bound ${bound}, tolerance ${tol} (${SOURCE}, ${p.source})`;
          expect(v, msg).toBeGreaterThanOrEqual(0);
          // 22 digits written: 1e-21 relative covers the reference's rounding
          expect(diff, `${msg}: bound below the actual error`).toBeLessThanOrEqual(bound + 1e-21 * ref);
          expect(diff, msg).toBeLessThanOrEqual(tol);
        }
      });
    });

    it(`${k.name}: quantiles within their bounds; ES only where the mean exists`, () => {
      const m = compile(k.model);
      const ps = k.levels.map((l) => l.p);
      const q = quantiles(m, ps, { expectedShortfall: true });
      k.levels.forEach((l, i) => {
        const ref = Number(l.x);
        const diff = Math.abs(q.x[i] - ref);
        const bound = q.diagnostics.quantileError[i];
        const msg = `${k.name} quantile ${l.p}: value ${q.x[i]}, expected ${ref} (${l.source}), difference ${diff}, bound ${bound}`;
        expect(diff, `${msg}: bound below the actual error`).toBeLessThanOrEqual(bound + Math.abs(l.x_check) + 1e-21 * Math.abs(ref));
        expect(diff, msg).toBeLessThanOrEqual(1e-7 * Math.max(1, Math.abs(ref)));
        if (k.folded.alpha <= 1) expect(Number.isNaN(q.expectedShortfall![i]), `${k.name}: ES of an infinite-mean law`).toBe(true);
        else expect(q.expectedShortfall![i], `${k.name}: ES at ${l.p} beyond the quantile`).toBeGreaterThanOrEqual(q.x[i]);
      });
    });

    it(`${k.name}: moments from the sum's own terms (the mean for alpha > 1, no variance below 2)`, () => {
      const r = moments(k.model, 2);
      const a = k.folded.alpha;
      if (a <= 1) expect(r.mean, `${k.name}: the mean does not exist`).toBeNull();
      else {
        const loc = Number(k.folded.loc);
        expect(Math.abs(r.mean! - loc), `${k.name}: mean ${r.mean} vs folded S1 location ${loc} (mpmath)`).toBeLessThanOrEqual(1e-14 * Math.max(1, Math.abs(loc)));
      }
      if (a < 2) expect(r.raw[1], `${k.name}: no second moment`).toBeNull();
    });
  }

  it("terms of different beta or different alpha are not folded (the inversion answers)", () => {
    const s = (alpha: number, beta: number) => ({ family: "stable", alpha, beta, scale: 1, loc: 0 });
    expect(compile({ sum: [s(1.5, 0.2), s(1.5, 0.3)] }).direct).toBeUndefined();
    expect(compile({ sum: [s(1.5, 0), s(1.6, 0)] }).direct).toBeUndefined();
    expect(compile({ sum: [s(1, 0.5), s(1, 0.5)] }).direct).toBeUndefined();
    expect(compile({ sum: [s(1.5, 0), { family: "gamma", shape: 2, rate: 1 }] }).direct).toBeUndefined();
  });
});
