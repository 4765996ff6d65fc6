// Billing arithmetic in integer pence: periods, rounding half up, proration and the lines of a period.
// Expected values are worked by hand beside each case (common practice: time-proportional proration, half-up rounding).
import { describe, expect, it } from "vitest";
import { PLANS } from "@/lib/api/plans";
import { linesTotal, mulDivRound, periodLines, periodOf, prorationMinor } from "@/lib/billing/money";

describe("periods", () => {
  it("are calendar months in UTC", () => {
    const p = periodOf(new Date("2028-02-29T23:59:59.999Z"));
    expect(p.start.toISOString()).toBe("2028-02-01T00:00:00.000Z");
    expect(p.end.toISOString()).toBe("2028-03-01T00:00:00.000Z");
    expect(periodOf(new Date("2026-12-31T12:00:00Z")).end.toISOString()).toBe("2027-01-01T00:00:00.000Z");
  });
});

describe("mulDivRound", () => {
  it.each([
    [1, 1, 2, 1], // 0.5 -> 1 (half up)
    [1, 1, 3, 0], // 0.333 -> 0
    [2, 1, 3, 1], // 0.667 -> 1
    [5, 3, 2, 8], // 7.5 -> 8
    [400, 1_500_000, 1_000_000, 600],
    [400, 1, 1_000_000, 0], // 0.0004 -> 0
    [400, 1_250, 1_000_000, 1], // 0.5 -> 1
    [1_200_000, 2 ** 40, 2 ** 41, 600_000],
  ])("%i x %i / %i = %i", (a, n, d, want) => {
    expect(mulDivRound(a, n, d)).toBe(want);
  });
  it("is exact beyond 2^53 in the intermediate product", () => {
    // (2^52 + 1) x 3 / 3 = 2^52 + 1 exactly, though the product 3 x (2^52 + 1) is beyond a double's integers.
    expect(mulDivRound(2 ** 52 + 1, 3, 3)).toBe(2 ** 52 + 1);
    expect(mulDivRound(2 ** 52 + 1, 7, 14)).toBe(2 ** 51 + 1); // (2^52 + 1) / 2 = 2^51 + 0.5 -> up
  });
  it("refuses a non-positive divisor", () => expect(() => mulDivRound(1, 1, 0)).toThrow(RangeError));
});

describe("proration", () => {
  const march = periodOf(new Date("2027-03-10T00:00:00Z"));
  it("charges the fee difference for the time left", () => {
    // Starter -> Scale with 31 days of 31 left: the whole difference 235100.
    expect(prorationMinor("starter", "scale", march.start, march)).toBe(PLANS.scale.monthlyFeeMinor - PLANS.starter.monthlyFeeMinor);
    // Free -> Team at 2027-03-16T12:00Z: 15.5 of 31 days left, half of 39000 = 19500.
    expect(prorationMinor("free", "team", new Date("2027-03-16T12:00:00Z"), march)).toBe(19_500);
    // Team -> Scale with one second left: 201000 / 2678400 = 0.075 -> 0.
    expect(prorationMinor("team", "scale", new Date(march.end.getTime() - 1000), march)).toBe(0);
  });
  it("charges nothing for a downgrade or at the period's end", () => {
    expect(prorationMinor("team", "starter", march.start, march)).toBe(0);
    expect(prorationMinor("free", "team", march.end, march)).toBe(0);
  });
});

describe("period lines", () => {
  const p = periodOf(new Date("2027-01-05T00:00:00Z"));
  it("split the metered units into included and extra, adding up to the metered count", () => {
    const lines = periodLines({ feePlan: "team", usagePlan: "team", metered: 25_000_001, period: p });
    expect(lines.map((l) => l.quantity)).toEqual([1, 25_000_000, 1]);
    // One extra unit at 300 pence per million: 0.0003 pence -> 0.
    expect(lines.map((l) => l.amountMinor)).toEqual([39_000, 0, 0]);
    const more = periodLines({ feePlan: "starter", usagePlan: "team", metered: 26_234_567, period: p });
    // 1,234,567 extra x 300 / 1e6 = 370.37 -> 370; the fee is the plan held when the period began.
    expect(more.map((l) => l.amountMinor)).toEqual([4_900, 0, 370]);
    expect(linesTotal(more)).toBe(5_270);
  });
  it("bill nothing but the fee when nothing was metered", () => {
    const lines = periodLines({ feePlan: "scale", usagePlan: "scale", metered: 0, period: p });
    expect(lines.map((l) => l.quantity)).toEqual([1, 0, 0]);
    expect(linesTotal(lines)).toBe(PLANS.scale.monthlyFeeMinor);
  });
});
