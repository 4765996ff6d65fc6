// A bad level names what was sent and the form expected (the problem's detail is the issue's message).
import { describe, expect, it } from "vitest";
import { QuantilesBody } from "@/lib/api/schemas/quantiles";
import { RiskBody } from "@/lib/api/schemas/risk";

const model = { family: "normal", mu: 0, sigma: 1 };
const issues = (r: { success: boolean; error?: { issues: { message: string; path: PropertyKey[] }[] } }) => r.error?.issues.map((i) => [i.path.join("/"), i.message]) ?? [];

describe("level messages", () => {
  it("quantiles: a level out of range, a string level, a lone string for p", () => {
    expect(issues(QuantilesBody.safeParse({ model, p: [0.5, 1.5] }))).toEqual([["p/1", "levels must be strictly between 0 and 1 (got 1.5)"]]);
    expect(issues(QuantilesBody.safeParse({ model, p: ["0.99"] }))).toEqual([["p/0", 'each level must be a number strictly between 0 and 1, e.g. 0.99 (got "0.99")']]);
    expect(issues(QuantilesBody.safeParse({ model, p: "0.5" }))).toEqual([["p", 'levels are given as a list, e.g. [0.5, 0.99] (got "0.5")']]);
    expect(issues(QuantilesBody.safeParse({ model, p: 0.5 }))).toEqual([["p", "levels are given as a list, e.g. [0.5, 0.99] (got 0.5)"]]);
    expect(QuantilesBody.safeParse({ model, p: [0.5, 0.99] }).success).toBe(true);
  });
  it("risk: the same words for var and es levels", () => {
    expect(issues(RiskBody.safeParse({ model, var: { p: [0] } }))).toEqual([["var/p/0", "levels must be strictly between 0 and 1 (got 0)"]]);
    expect(issues(RiskBody.safeParse({ model, es: { p: 0.99 } }))).toEqual([["es/p", "levels are given as a list, e.g. [0.5, 0.99] (got 0.99)"]]);
  });
});
