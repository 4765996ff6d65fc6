// The lower-tail expected shortfall comes from the negated law's upper tail (lib/api/operations.ts): that answer's caveats
// (an estimated bound, a tolerance or shortfall goal not reached) belong to the lower-tail answer too, which before dropped
// them. Two stables and a uniform (as in heavy-derived.test.ts): the negated sum's answer carries notes of its own.
import { describe, expect, it } from "vitest";
import { runQuantiles } from "@/lib/api/operations";
import { compile, quantiles } from "@/lib/cf";

const model = {
  sum: [
    { family: "uniform", a: -1, b: 2.684 },
    { family: "stable", alpha: 1.606, beta: -0.096, scale: 1, loc: 0, param: "S1" },
    { family: "stable", alpha: 1.715, beta: 0.234, scale: 1, loc: 0, param: "S1" },
  ],
};

describe("lower-tail expected shortfall: the negated law's caveats are reported", () => {
  it("notes and tolerance report", () => {
    const p = [0.001, 0.01];
    const r = runQuantiles({ model, p, expectedShortfall: true, tail: "lower" } as Parameters<typeof runQuantiles>[0]);
    const up = quantiles(compile(model as never), p);
    const neg = quantiles(compile({ scale: -1, of: model } as never), p.map((v) => 1 - v), { expectedShortfall: true });
    const own = neg.diagnostics.notes.filter((n) => !up.diagnostics.notes.includes(n));
    expect(own.length, `negated answer's notes: ${JSON.stringify(neg.diagnostics.notes)}`).toBeGreaterThan(0);
    for (const n of own) expect(r.diagnostics.notes, `note: ${n}`).toContain(`lower-tail expected shortfall (the negated law's upper tail): ${n}`);
    expect(r.diagnostics.tolerance?.met, `tolerance ${JSON.stringify(r.diagnostics.tolerance)}, negated ${JSON.stringify(neg.diagnostics.tolerance)}`).toBe(
      (up.diagnostics.tolerance?.met ?? true) && (neg.diagnostics.tolerance?.met ?? true),
    );
  });
});
