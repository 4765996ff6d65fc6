// The alpha = 1 tail series of lib/cf/direct/stable-one-tail.ts against the Cauchy law's closed forms (beta = 0) and the
// mpmath references of tests/fixtures/stable (generate.py: the rotated Fourier integral or Nolan's integrals integrated
// by parts in log V, each cross-checked by a second method): the value within its bound, the bound a derived one of at
// most 1e-12 relative.
import { stableReferencePoints } from "./stable-fixture";
import { describe, expect, it } from "vitest";
import { stableOneTail } from "@/lib/cf/direct/stable-one-tail";
import { close } from "./model-assert";


/** |value - reference| <= bound (plus the 20-digit reference's own rounding), and the bound at most rel of the value */
function within(v: number, e: number, ref: number, rel: number, what: string) {
  const diff = Math.abs(v - ref);
  if (!(diff <= e + 1e-19 * ref)) expect.fail(`${what}: value ${v}, reference ${ref}, difference ${diff} above the bound ${e}`);
  if (!(e <= rel * ref)) expect.fail(`${what}: bound ${e} above ${rel} of the reference ${ref}`);
}

describe("alpha = 1 tail series", () => {
  it.each([40, 55.5, 100, 1e3, 1e5, 1e8, 1e15])("beta = 0 at z = %f: the Cauchy law, f = 1/(pi (1 + z^2)), sf = atan(1/z)/pi (common practice)", (z) => {
    const r = stableOneTail(0, z);
    if (!r) return expect.fail(`no series value at z = ${z}`);
    const f = 1 / (Math.PI * (1 + z * z));
    const sf = Math.atan(1 / z) / Math.PI;
    // the closed forms' own rounding: a few eps
    within(r.pdf, r.pdfErr + 4 * Number.EPSILON * f, f, 1e-12, `pdf at ${z}`);
    within(r.sf, r.sfErr + 4 * Number.EPSILON * sf, sf, 1e-12, `sf at ${z}`);
  });

  const rows = stableReferencePoints().filter((r) => r.model.alpha === 1 && r.model.beta !== 0);
  const far = rows
    .map((r) => {
      const { beta, scale: g, loc, param } = r.model;
      const d1 = param === "S1" ? loc : loc - beta * (2 / Math.PI) * g * Math.log(g);
      return { r, z: (r.x - d1) / g, g };
    })
    // the series' side of each point: z > 0 with beta, z < 0 as -z with -beta (beta = 1 there is the light side)
    .filter(({ r, z }) => Math.abs(z) >= 1000 && !(z < 0 && r.model.beta === 1));

  it("covers the far alpha = 1 fixture points", () => {
    expect(far.length).toBeGreaterThanOrEqual(20);
  });

  it.each(far.map(({ r, z, g }) => [r.model.beta, z, g, r] as const))("beta = %f at z = %f (scale %f): pdf and the far tail within bounds of at most 1e-12 relative", (beta, z, g, r) => {
    const s = stableOneTail(z > 0 ? beta : -beta, Math.abs(z));
    if (!s) return expect.fail(`no series value at beta ${beta}, z ${z}`);
    // the fixture is at x: the standard density over g (exact scaling is within 1 ulp: added to the bound)
    const pdf = s.pdf / g;
    within(pdf, s.pdfErr / g + 2 * Number.EPSILON * pdf, Number(r.pdf), 1e-12, `pdf at beta ${beta}, z ${z}`);
    within(s.sf, s.sfErr, Number(z > 0 ? r.sf : r.cdf), 1e-12, `far tail at beta ${beta}, z ${z}`);
    close(s.pdf / g, Number(r.pdf), { rel: 1e-14 }, `pdf at beta ${beta}, z ${z} (actual accuracy)`);
  });

  it.each([30, 33, 36])("beta = 0 at z = %f (the path's second piece, e^-z, near 1e-12 of the value): the Cauchy closed forms within finite bounds", (z) => {
    const r = stableOneTail(0, z, Infinity);
    if (!r) return expect.fail(`no series value at z = ${z}`);
    const f = 1 / (Math.PI * (1 + z * z));
    const sf = Math.atan(1 / z) / Math.PI;
    within(r.pdf, r.pdfErr + 4 * Number.EPSILON * f, f, 1e-6, `pdf at ${z}`);
    within(r.sf, r.sfErr + 4 * Number.EPSILON * sf, sf, 1e-6, `sf at ${z}`);
  });

  it("beta = -1 on its light side and z below the series' range: no value (another route answers)", () => {
    expect(stableOneTail(-1, 1e4)).toBeNull();
    expect(stableOneTail(0.5, 5)).toBeNull();
    expect(stableOneTail(0.5, Number.NaN)).toBeNull();
  });
});
