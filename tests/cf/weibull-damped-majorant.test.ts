// The damped majorant of weibull terms (lib/cf/weibull-majorant.ts: by parts from the density, its singularity at 0 split
// off for shapes below 1, and along a rotated ray) against |psi| and |psi'| of the damped transform by mpmath at 30 digits
// (tests/fixtures/damped-majorant/generate_weibull.py: quadrature along two rays, or the real line): every row within the
// bound, the decay's power past t0 above the bound further out, and the bound tight far out (for shapes up to 1 the ray's
// Gamma(k + 1) (lambda |s|)^-k is the size of the expansion's first term, so a smaller constant fails).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { buildNode } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { majorantRowHolds } from "../support/damped-majorant-rows";

interface Row {
  shape: number;
  scale: number;
  beta: string;
  t: string;
  abs: string;
  slope: string;
  check: number;
}
const rows = (JSON.parse(readFileSync(new URL("../fixtures/damped-majorant/weibull.json", import.meta.url), "utf8")) as { rows: Row[] }).rows;
const laws = [...new Set(rows.map((r) => `${r.shape},${r.scale}`))].map((s) => s.split(",").map(Number));

describe("weibull damped majorant vs mpmath (tests/fixtures/damped-majorant/weibull.json)", () => {
  it.each(laws.map(([k, l]) => [k, l] as const))("weibull(%s, %s): rest >= |psi| and slope >= |psi'| at every row, tight far out", (k, l) => {
    // a weibull alone is light (the undamped route answers it): the node carries the majorant for sums that hold it
    const m = buildNode({ family: "weibull", shape: k, scale: l } as Model).dampedMajorant;
    expect(m, "a damped majorant").toBeDefined();
    let tightRest = 0;
    let tightSlope = 0;
    for (const r of rows.filter((x) => x.shape === k && x.scale === l)) {
      const ratio = majorantRowHolds(m!, r, `beta ${r.beta} t ${r.t}`);
      if (Number(r.t) >= 100) {
        tightRest = Math.max(tightRest, ratio.rest);
        tightSlope = Math.max(tightSlope, ratio.slope);
      }
    }
    // far out |psi| ~ Gamma(k + 1) (lambda t)^-k; the ray's bound for k > 1 is (1 / sin(pi / (2k)))^k larger (k = 3: 8)
    expect(tightRest, "largest |psi| / rest at t >= 100").toBeGreaterThan(k <= 1 ? 0.8 : k < 2 ? 0.5 : 0.1);
    expect(tightSlope, "largest |psi'| / slope at t >= 100").toBeGreaterThan(0.05);
  });
});
