// The lattice-table routes (Panjer recursion, the direct sum over a count's table, convolutions) check the deadline:
// a compound whose severity lattice forces a fine common step stops at its deadline instead of running for seconds.
import { afterEach, describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { clearDeadline, isDeadlineExceeded, setDeadline } from "@/lib/cf/deadline";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";

afterEach(() => clearDeadline());

describe("deadline in the lattice-table routes", () => {
  it("NB count of a lattice severity off the origin (common step 0.002): stops in the table's loop", () => {
    // found by the property tests: ~9.5 s of table building with a 100 ms deadline before the loops checked it
    const m = compile({ compound: { count: { family: "negative_binomial", r: 4.197, p: 0.201 }, each: { lattice: { origin: 0.322, step: 2, p: [0.3, 0.4, 0.3] } } } } as Model);
    setDeadline(Date.now() + 50);
    let caught: unknown = null;
    try {
      quantiles(m, [0.5, 0.99]);
    } catch (e) {
      caught = e;
    }
    expect(isDeadlineExceeded(caught)).toBe(true);
    expect((caught as { stage: string }).stage).toMatch(/compound-table|panjer|convolve/);
  });
});
