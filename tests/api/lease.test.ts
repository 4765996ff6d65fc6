// Lease blocks divide each plan's per-second limit exactly, so leases never strand part of a window.
import { describe, expect, it } from "vitest";
import { PLANS } from "@/lib/api/plans";
import { leaseSize } from "@/lib/api/rate-limit";

describe("leaseSize", () => {
  it.each([
    [10, 2],
    [50, 10],
    [200, 50],
    [5000, 1250],
    [7, 1],
    [3, 1],
    [1, 1],
  ])("limit %d -> block %d", (rps, block) => {
    expect(leaseSize(rps)).toBe(block);
  });
  it("divides every plan's limit and is at most a quarter of it (or 1)", () => {
    for (const p of Object.values(PLANS)) {
      const b = leaseSize(p.requestsPerSecond);
      expect(p.requestsPerSecond % b).toBe(0);
      expect(b === 1 || b <= p.requestsPerSecond / 4).toBe(true);
    }
  });
});
