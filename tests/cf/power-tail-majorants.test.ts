// Power-law majorants of a density and its first two derivatives in the tails (lib/cf/direct/power-tail.ts), which the
// power-tail route's derived aliasing bound rests on: each must be at least |f^(j)| at every point past its `from`.
// Stable laws against mpmath (tests/fixtures/power-tail/generate.py: the Fourier integral on the real axis and on a rotated
// ray, 30 digits), also through a X + b with a < 0 (sides swapped, f_Y^(j) = f_X^(j) / (|a| a^j)); Student t and pareto
// against their closed forms (common practice: f_t(z) = C (1 + z^2/nu)^(-(nu+1)/2), C = 2/(pi sqrt 3) for nu = 3 and
// 8/(3 pi sqrt 5) for nu = 5; pareto f = alpha xm^alpha x^(-alpha-1), JKB vol. 1 ch. 20 and vol. 2 ch. 28). Tolerance: the
// majorant may not fall below the value by more than the reference's own uncertainty (`check`) and 1e-12 relative.
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { stableDirect } from "@/lib/cf/direct/stable";
import { paretoDirect, studentDirect } from "@/lib/cf/direct/families";
import { affineDirect } from "@/lib/cf/direct/affine";
import { powerAt, type PowerTail } from "@/lib/cf/direct/power-tail";

interface Row {
  alpha: number;
  beta: number;
  x: number;
  pdf: string;
  d1: string;
  d2: string;
  check: number;
}
const rows = (JSON.parse(readFileSync(new URL("../fixtures/power-tail/power-tail.json", import.meta.url), "utf8")) as { rows: Row[] }).rows;

/** the majorant of |f^(j)| at y, or null where it does not apply (short of `from`, or a support's end) */
function majorant(pt: PowerTail, y: number, j: number): number | null {
  for (const [side, s] of [[1, pt.right], [-1, pt.left]] as const) {
    if ("end" in s) continue;
    const z = side * (y - s.origin);
    if (z > 0 && z >= s.from) return powerAt(s.d[j], z);
  }
  return null;
}

describe("stable majorants vs mpmath (tests/fixtures/power-tail)", () => {
  it.each(rows.map((r) => [`alpha ${r.alpha} beta ${r.beta} x ${r.x}`, r] as const))("%s", (_n, r) => {
    const law = stableDirect(r.alpha, r.beta, 1, 0, "S1")!;
    const pt = law.powerTail!;
    const vals = [Number(r.pdf), Number(r.d1), Number(r.d2)];
    for (let j = 0; j < 3; j++) {
      const m = majorant(pt, r.x, j)!;
      expect(m, `j = ${j} at x = ${r.x}: majorant ${m} vs |f^(${j})| = ${Math.abs(vals[j])}`).toBeGreaterThanOrEqual(Math.abs(vals[j]) * (1 - 1e-12) - r.check);
    }
    expect(pt.fmax, `fmax vs f(${r.x})`).toBeGreaterThanOrEqual(vals[0]);
    // the same law as -2 X + 3: y = -2 x + 3, |f_Y^(j)(y)| = |f^(j)(x)| / 2^(j+1)
    const aff = affineDirect(law, -2, 3).powerTail!;
    const y = -2 * r.x + 3;
    for (let j = 0; j < 3; j++) {
      const m = majorant(aff, y, j)!;
      expect(m, `-2 X + 3, j = ${j} at y = ${y}: majorant ${m}`).toBeGreaterThanOrEqual((Math.abs(vals[j]) / 2 ** (j + 1)) * (1 - 1e-12) - r.check);
    }
  });

  // (not on the light side of a totally skewed law, beta = 1 and x < 0, whose tail falls faster than any power)
  it("far out the majorant is within a factor 20 of the density's size (not vacuous)", () => {
    for (const r of rows.filter((r) => Math.abs(r.x) >= 300 && !(Math.abs(r.beta) === 1 && Math.sign(r.x) === -Math.sign(r.beta)))) {
      const m = majorant(stableDirect(r.alpha, r.beta, 1, 0, "S1")!.powerTail!, r.x, 0)!;
      expect(m / Number(r.pdf), `alpha ${r.alpha} beta ${r.beta} x ${r.x}`).toBeLessThan(20);
    }
  });
});

describe("Student t and pareto majorants vs their closed forms", () => {
  const tCases = [
    { nu: 3, loc: 0.5, scale: 2, C: 2 / (Math.PI * Math.sqrt(3)) },
    { nu: 5, loc: -1, scale: 0.7, C: 8 / (3 * Math.PI * Math.sqrt(5)) },
  ];
  it.each(tCases.map((c) => [`t nu ${c.nu} loc ${c.loc} scale ${c.scale}`, c] as const))("%s", (_n, c) => {
    const pt = studentDirect(c.nu, c.loc, c.scale).powerTail!;
    for (const y of [-400, -60, -9, -2, 0.7, 3, 25, 300]) {
      const z = (y - c.loc) / c.scale;
      const u = 1 + (z * z) / c.nu;
      const a = (c.nu + 1) / 2;
      const f = (c.C / c.scale) * u ** -a;
      const f1 = (c.C / c.scale ** 2) * (-2 * a * z / c.nu) * u ** (-a - 1);
      const f2 = (c.C / c.scale ** 3) * (2 * a / c.nu) * u ** (-a - 2) * ((2 * a + 1) * (z * z) / c.nu - 1);
      [f, f1, f2].forEach((v, j) => {
        const m = majorant(pt, y, j)!;
        expect(m, `y = ${y}, j = ${j}: majorant ${m} vs ${v}`).toBeGreaterThanOrEqual(Math.abs(v) * (1 - 1e-12));
      });
    }
  });

  it("pareto(2.5, 1.5) and its shift by 4", () => {
    for (const [law, b] of [[paretoDirect(2.5, 1.5), 0], [affineDirect(paretoDirect(2.5, 1.5), 1, 4), 4]] as const) {
      const pt = law.powerTail!;
      expect("end" in pt.left ? pt.left.end : NaN).toBeCloseTo(1.5 + b, 12);
      for (const x of [1.5, 1.6, 3, 20, 500]) {
        const f = 2.5 * 1.5 ** 2.5 * x ** -3.5;
        const vals = [f, (3.5 * f) / x, (3.5 * 4.5 * f) / (x * x)];
        vals.forEach((v, j) => {
          const m = majorant(pt, x + b, j)!;
          expect(m, `x = ${x}, j = ${j}: majorant ${m} vs ${v}`).toBeGreaterThanOrEqual(v * (1 - 1e-12));
        });
      }
    }
  });
});
