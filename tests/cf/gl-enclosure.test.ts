import { describe, expect, it } from "vitest";
import { gaussLegendre } from "@/lib/cf/quadrature";
import { glEnclosure } from "@/lib/cf/gl-enclosure";
import ref from "../fixtures/gauss-legendre/gauss-legendre.json";

// The Gauss-Legendre rule as computed (Newton on P_n) against mpmath's nodes and weights to 50 digits (Newton on
// mpmath.legendre, checked against Golub-Welsch eigenvalues: tests/fixtures/gauss-legendre/generate.py). Each reference is a
// pair of doubles hi + lo; the computed value minus hi is exact (they agree to a few ulps, Sterbenz), so the error is known to
// far below an ulp. Tolerance: the enclosure itself (it must hold, and stay within a few hundred ulps of the truth).
describe("Gauss-Legendre enclosures", () => {
  it("the reference's two methods agree", () => {
    for (const r of ref.rules) expect(r.crossCheck, `n ${r.n}`).toBeLessThan(1e-40);
  });

  for (const r of ref.rules) {
    it(`n = ${r.n}: each node within dx, each weight within dw of mpmath's`, () => {
      const { x, w } = gaussLegendre(r.n);
      const e = glEnclosure(r.n);
      for (let i = 0; i < r.n; i++) {
        const ex = Math.abs(x[i] - r.x[i][0] - r.x[i][1]);
        const ew = Math.abs(w[i] - r.w[i][0] - r.w[i][1]);
        const msg = `n ${r.n} i ${i}: node ${x[i]} ref ${r.x[i][0]} err ${ex} dx ${e.dx[i]}; weight ${w[i]} ref ${r.w[i][0]} err ${ew} dw ${e.dw[i]}`;
        expect(ex, msg).toBeLessThanOrEqual(e.dx[i]);
        expect(ew, msg).toBeLessThanOrEqual(e.dw[i]);
        // derived, not wide: a node to a few ulps of 1, a weight to its sensitivity to the node (|g'/g| <= 2 / (1 - z^2))
        expect(e.dx[i], msg).toBeLessThanOrEqual(4 * Number.EPSILON);
        expect(e.dw[i] / w[i], msg).toBeLessThan(1e-11);
      }
    });
  }
});
