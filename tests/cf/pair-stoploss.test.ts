// The expected shortfall's derived bound where two power-tailed terms' images are taken out of the sums (the pair's
// stop-loss bound, lib/cf/invert/heavy-residual2.ts, used by lib/cf/invert/shortfall.ts): E[(X - q)^+] for pareto(2.2) +
// Student t(3.6) against mpmath numerical convolution at 24 digits (tests/fixtures/pair-sums/generate_stoploss.py, two
// integrals with the terms' roles swapped, their difference `check`), at three first periods. Tolerance: the reported
// bound (absolute) plus the reference's check; the bound must also have teeth (largest actual / bound above 1e-3).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile } from "@/lib/cf";
import { heavyLadder } from "@/lib/cf/invert/heavy-ladder";
import { heavyShortfall } from "@/lib/cf/invert/shortfall-heavy";
import { lawShape } from "@/lib/cf/invert/range";

const cases = (
  JSON.parse(readFileSync(new URL("../fixtures/pair-sums/pair-stoploss.json", import.meta.url), "utf8")) as {
    cases: { name: string; model: unknown; points: { q: string; stopLoss: string; check: number }[] }[];
  }
).cases;
type Case = (typeof cases)[number];
type Ladder = ReturnType<typeof heavyLadder>;

/**
 * E[(X - q)^+] at the case's points from the shortfall over the ladder at first periods of 64, 128 and 256 scales: every
 * value derived (no estimate) and within its bound plus the reference's check, the bound with teeth (largest actual /
 * bound above 1e-3); `ladderHas` states what the ladder must hold at each period.
 */
function withinPairBound(k: Case, ladderHas: (lad: Ladder, T0: number) => void) {
  const model = compile(k.model as never);
  const shape = lawShape(model);
  const mean = model.cumulants(1)[0]!;
  let worst = 0;
  for (const T0 of [64, 128, 256]) {
    const lad = heavyLadder(model, [], T0 * model.scale, 3, 1e-10);
    ladderHas(lad, T0);
    const sh = heavyShortfall(model, [], 1, mean, shape, 1e-10, 50, lad);
    for (const p of k.points) {
      const r = sh(Number(p.q), 1e-12);
      const ref = Number(p.stopLoss);
      const diff = Math.abs(r.value - ref);
      const what = `T0 = ${T0} scales, q = ${p.q}: engine ${r.value}, reference ${p.stopLoss} (check ${p.check}), diff ${diff.toExponential(3)}, bound ${r.error.toExponential(3)}`;
      expect(r.estimated, `${what}: derived`).toBe(false);
      expect(diff, what).toBeLessThanOrEqual(r.error + p.check);
      worst = Math.max(worst, diff / r.error);
    }
  }
  expect(worst, "largest actual / bound").toBeGreaterThan(1e-3);
}

const c = cases[0];

describe("pair stop-loss bound vs mpmath convolution (tests/fixtures/pair-sums/pair-stoploss.json)", () => {
  it(`${c.name}: E[(X - q)^+] within the derived bound, no estimate`, () =>
    withinPairBound(c, (lad, T0) => expect(lad.pair, `T0 = ${T0} scales: the pair's bound expected`).not.toBeNull()));

  // pareto(1.5) + t(3.7): the t's index lies between the pareto's second power (3.5) and 4, so the quantiles' ladder takes
  // out the pareto's images alone, and the rest (the t) has no fourth moment for the one-term stop-loss residual: the
  // shortfall takes out the t's images too and answers with the pair's bound (fails as estimated without it)
  const c2 = cases[1];
  it(`${c2.name}: one term's images in the ladder, E[(X - q)^+] within the pair's derived bound`, () =>
    withinPairBound(c2, (lad, T0) => {
      expect(lad.images.length, `T0 = ${T0} scales: one term's images`).toBe(1);
      expect(lad.resid, `T0 = ${T0} scales: the one-term residual`).not.toBeNull();
    }));
});
