// Stop-loss transforms of stable laws far in their tails from the tail series integrated term by term
// (lib/cf/direct/stable-series.ts, stableTailStopLoss; used for the images of stable terms in the expected shortfall of
// heavy sums, lib/cf/invert/images.ts). Reference: E|X - c| from the CF by mpmath at 30 digits, two quadratures
// (tests/fixtures/stable/generate-stop-loss.py). Each value must lie within its own bound (plus the reference's own
// uncertainty) and within 1e-9 relative.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { stableDirect } from "@/lib/cf/direct/stable";
import { affineDirect } from "@/lib/cf/direct/affine";

interface Case { alpha: number; beta: number; c: number; side: 1 | -1; stop_loss: string; abs_diff: number }
const cases = (JSON.parse(readFileSync(new URL("../fixtures/stable/stop-loss.json", import.meta.url), "utf8")) as { cases: Case[] }).cases;

describe("stable stop-loss transforms in the tails (series) vs mpmath", () => {
  it("the fixture's two quadratures agree within 1e-12 relative", () => {
    for (const c of cases) expect(c.abs_diff / Number(c.stop_loss), JSON.stringify(c)).toBeLessThan(1e-12);
    expect(cases.length).toBeGreaterThanOrEqual(8);
  });
  it.each(cases.map((c) => [`alpha ${c.alpha}, beta ${c.beta}, c = ${c.c}`, c] as const))("%s", (_n, c) => {
    const ref = Number(c.stop_loss);
    const law = stableDirect(c.alpha, c.beta, 1, 0, "S1")!;
    // the same law scaled by 2 and shifted by 3: pi_Y(2 c + 3) = 2 pi_X(c)
    const scaled = affineDirect(law, 2, 3);
    for (const [label, r, want] of [
      ["standard", law.stopLoss!(c.c, c.side), ref],
      ["scaled by 2, shifted by 3", scaled.stopLoss!(2 * c.c + 3, c.side), 2 * ref],
    ] as const) {
      expect(r, `${label}: the series was not accepted at c = ${c.c}`).not.toBeNull();
      const diff = Math.abs(r!.v - want);
      const msg = `${label}: stop-loss ${r!.v}, expected ${want}, difference ${diff}, bound ${r!.e}`;
      // the bound, plus the reference's own uncertainty (the difference of its two quadratures)
      expect(diff, msg).toBeLessThanOrEqual(r!.e + 2 * c.abs_diff * (want / ref));
      expect(diff / want, msg).toBeLessThanOrEqual(1e-9);
    }
  });
});
