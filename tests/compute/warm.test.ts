// The compute threads' warm-up (lib/compute/warm.ts): every request in it is one the public API accepts (parsed by the
// endpoint's own schema, as the gate does), and run in a thread it finishes without an error, within its budget.
// Whether the warm-up makes later calls faster is measured, not tested: scripts/bench-cf-models.ts (BENCH_WARM).
import { describe, expect, it } from "vitest";
import { ConvolveRequest } from "@/lib/api/schemas/convolve";
import { DensityBody } from "@/lib/api/schemas/density";
import { MomentsBody } from "@/lib/api/schemas/moments";
import { QuantilesBody } from "@/lib/api/schemas/quantiles";
import { WARM_REQUESTS, warmEngine } from "@/lib/compute/warm";

const SCHEMAS = { quantiles: QuantilesBody, density: DensityBody, moments: MomentsBody, convolve: ConvolveRequest } as const;

describe("the compute threads' warm-up", () => {
  it("covers the four computing endpoints, each body valid for its endpoint", () => {
    expect(new Set(WARM_REQUESTS.map((r) => r.op))).toEqual(new Set(Object.keys(SCHEMAS)));
    for (const r of WARM_REQUESTS) {
      const schema = SCHEMAS[r.op as keyof typeof SCHEMAS];
      const parsed = schema.safeParse(r.body);
      expect(parsed.success, `${r.op} ${JSON.stringify(r.body).slice(0, 120)}: ${parsed.success ? "" : parsed.error.message}`).toBe(true);
    }
  });

  it("runs every request to the end without an error (generous budget), and stops at a budget it is given", () => {
    const full = warmEngine(120_000, 60_000);
    expect(full.failed).toEqual([]);
    expect(full.done).toBe(WARM_REQUESTS.length);
    expect(full.skipped).toBe(0);
    // a budget of nothing: every request skipped, nothing thrown
    const cut = warmEngine(0, 60_000);
    expect(cut).toMatchObject({ done: 0, failed: [], skipped: WARM_REQUESTS.length });
  }, 180_000);
});
