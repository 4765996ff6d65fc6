// log(e^x K_nu(x)) at large x (the Student t CF's far frequencies), where the engine sums the asymptotic series
// (A&S 9.7.2) instead of the trapezoidal rule, against mpmath: tests/fixtures/bessel-large/bessel-large.json
// (generate.py beside it: mpmath.besselk at 30 digits, checked by mpmath.quad of A&S 9.6.24; its worst difference is in
// the file). The Student t CF at such frequencies against the same values through its closed form (JKB vol. 2, ch. 28).
import { afterAll, describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile, logBesselKScaled, lgamma } from "@/lib/cf";
import { close, record, worst } from "./model-assert";

const REF = JSON.parse(readFileSync(new URL("../fixtures/bessel-large/bessel-large.json", import.meta.url), "utf8")) as {
  worstDiff: string;
  values: { nu: number; x: number; logScaledK: string; diff: string }[];
};

afterAll(() => console.log("worst errors:", JSON.stringify(worst)));

describe("log(e^x K_nu(x)) for x >= 64 vs mpmath.besselk (tests/fixtures/bessel-large, cross-checked by quadrature)", () => {
  it("the fixture's two methods agree to 1e-25", () => {
    expect(Number(REF.worstDiff)).toBeLessThan(1e-25);
  });
  // 8 units of the log's size (1 + |log|), the allowance the engine states per CF node (lib/cf/invert/part.ts cfUlps)
  it.each(REF.values.map((v) => [v.nu, v.x, v] as const))("nu = %d, x = %d", (nu, x, v) => {
    const ref = Number(v.logScaledK);
    const got = logBesselKScaled(nu, x);
    const tol = 8 * Number.EPSILON * (1 + Math.abs(ref));
    close(got, ref, { abs: tol }, `log(e^x K_${nu}(${x})) (source: mpmath.besselk, tests/fixtures/bessel-large)`);
    record("|log e^x K - mpmath| / (u (1 + |log|))", Math.abs(got - ref) / (Number.EPSILON * (1 + Math.abs(ref))));
  });
  it("Student t log-CF at far frequencies equals its Bessel closed form with the mpmath values", () => {
    // phi(t) = K_{nu/2}(z) z^{nu/2} / (Gamma(nu/2) 2^{nu/2 - 1}), z = sqrt(nu) scale |t| (JKB vol. 2, ch. 28, sec. 2)
    const rows = REF.values.filter((v) => v.nu <= 50 && v.x <= 1e5);
    for (const v of rows) {
      const nu = 2 * v.nu;
      const scale = 1.3;
      const t = v.x / (Math.sqrt(nu) * scale);
      const re = new Float64Array(1);
      const im = new Float64Array(1);
      compile({ family: "student_t", nu, loc: 0, scale }).logCf(Float64Array.of(t), re, im);
      const ref = Number(v.logScaledK) - v.x + (nu / 2) * Math.log(v.x) - lgamma(nu / 2) - (nu / 2 - 1) * Math.LN2;
      close(re[0], ref, { abs: 64 * Number.EPSILON * (1 + Math.abs(ref)) }, `student_t nu=${nu} t=${t} (source: mpmath.besselk)`);
    }
  });
});
