// Every stable fixture point (tests/fixtures/stable/generate.py, mpmath) answered with a derived bound of its own route:
// panels, tail series or closed form ("derived"), not a rule's value bounded by its distance to looser panels
// ("compared") nor an Infinity bound ("none"), and that bound at most 1e-8 of the value and above the actual error.
// (scripts/stable-routes.ts prints the same per law.)
import { stableReferencePoints } from "./stable-fixture";
import { describe, expect, it } from "vitest";
import { stableLastRoute, stdAt } from "@/lib/cf/direct/stable";
import { tanHalfPi } from "@/lib/cf/direct/stable-kernel";
import { directPoint } from "@/lib/cf/direct/types";

const rows = stableReferencePoints();

describe("stable routes: derived bounds at every fixture point", () => {
  it.each(rows.map((r) => [`${r.model.alpha}/${r.model.beta}/${r.model.param} x=${r.x}`, r] as const))("%s", (_n, r) => {
    const { alpha, beta, scale: g, loc, param } = r.model;
    const shift = alpha === 1 ? beta * (2 / Math.PI) * g * Math.log(g) : beta * g * tanHalfPi(alpha);
    const d1 = param === "S1" ? loc : loc - shift;
    const out = directPoint();
    // the standard law at z (the fixture's pdf is at x: over g), z known to within dz (its rounding here: x - d1, the
    // division and the S0 shift, as lib/cf/direct/stable.ts passes it)
    const dz = (2 * Number.EPSILON * (Math.abs(r.x) + Math.abs(d1)) + (param === "S1" ? 0 : 4 * Number.EPSILON * Math.abs(shift))) / g;
    stdAt(alpha, beta, (r.x - d1) / g, out, dz);
    expect(stableLastRoute()).toBe("derived");
    const checks: [string, number, number, number][] = [
      ["pdf", out.pdf / g, Number(r.pdf), out.pdfErr / g],
      ["cdf", out.cdf, Number(r.cdf), out.cdfErr],
      ["sf", out.sf, Number(r.sf), out.sfErr],
    ];
    for (const [what, v, ref, e] of checks) {
      // dz moves cdf and sf by at most about f dz (the density's own bound takes it in)
      const moved = what === "pdf" ? 0 : 2 * out.pdf * dz;
      if (!(Math.abs(v - ref) <= e + moved + 1e-18 * ref + 1e-300)) expect.fail(`${what}: value ${v}, reference ${ref}, bound ${e}`);
      if (ref > 1e-300 && !(e <= 1e-8 * ref)) expect.fail(`${what}: bound ${e} above 1e-8 of the reference ${ref}`);
    }
  });
});
