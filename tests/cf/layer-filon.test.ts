// The Filon-type rule behind the per-claim layer's CF (lib/cf/filon.ts), checked at high frequencies where a plain
// quadrature would need thousands of nodes, against closed forms.
import { describe, expect, it } from "vitest";
import { oscillatoryIntegral, sphericalBessel } from "@/lib/cf/filon";
import { compile } from "@/lib/cf";

describe("spherical Bessel functions j_0..j_15", () => {
  // DLMF 10.49.3 (Rayleigh's formulas written out): j_0 = sin w / w, j_1 = sin w / w^2 - cos w / w,
  // j_2 = (3 / w^3 - 1 / w) sin w - 3 cos w / w^2, j_3 = (15 / w^4 - 6 / w^2) sin w - (15 / w^3 - 1 / w) cos w
  const closed = (n: number, w: number) => {
    const s = Math.sin(w);
    const c = Math.cos(w);
    if (n === 0) return s / w;
    if (n === 1) return s / (w * w) - c / w;
    if (n === 2) return (3 / w ** 3 - 1 / w) * s - (3 * c) / (w * w);
    return (15 / w ** 4 - 6 / (w * w)) * s - (15 / w ** 3 - 1 / w) * c;
  };
  for (const w of [0.7, 1.3, 3, 9.5, 17, 40, 250]) {
    it(`w = ${w}: orders 0..3 equal the elementary forms (DLMF 10.49.3)`, () => {
      const out = new Float64Array(16);
      sphericalBessel(w, out);
      for (let n = 0; n <= 3; n++) expect(Math.abs(out[n] - closed(n, w))).toBeLessThan(2e-15 * Math.max(1, 10 / w));
    });
  }
  it("small w: j_n(w) ~ w^n / (2n + 1)!! (DLMF 10.52.1), down to w = 1e-30", () => {
    const out = new Float64Array(16);
    for (const w of [0.3, 1e-4, 1e-30]) {
      sphericalBessel(w, out);
      let df = 1;
      for (let n = 0; n < 16; n++) {
        if (n > 0) df *= 2 * n + 1;
        const lead = w ** n / df;
        // next term of the series: -w^2 / (2 (2n + 3)) relative; below the smallest double both are 0
        if (lead < 1e-290) expect(Math.abs(out[n])).toBeLessThan(1e-280);
        else expect(Math.abs(out[n] / lead - 1)).toBeLessThanOrEqual((w * w) / (2 * (2 * n + 3)) + 1e-15);
      }
    }
  });
  it("sum_n (2n + 1) j_n(w)^2 = 1 (DLMF 10.60.9): the orders kept cover nearly all of it when w is below 8", () => {
    const out = new Float64Array(16);
    for (const w of [0.9, 2.5, 6]) {
      sphericalBessel(w, out);
      let s = 0;
      for (let n = 0; n < 16; n++) s += (2 * n + 1) * out[n] * out[n];
      expect(Math.abs(s - 1)).toBeLessThan(1e-9);
    }
  });
});

describe("int_a^b f(u) e^{isu} du by the Filon-type rule", () => {
  it("exponential density on [0, 3] at s up to 1e5: closed form theta (e^{(is - theta) 3} - 1) / (is - theta) (common practice), within the stated error", () => {
    const theta = 0.8;
    const f = (u: number) => theta * Math.exp(-theta * u);
    const F = (u: number) => 1 - Math.exp(-theta * u);
    const bounds = [0, 0.25, 0.6, 1.1, 1.8, 3];
    const rule = oscillatoryIntegral(bounds, f, (a, b) => F(b) - F(a));
    expect(rule.error).toBeGreaterThan(0);
    expect(rule.error).toBeLessThan(1e-13);
    const out = new Float64Array(2);
    for (const s of [-7.5, 0, 0.3, 12, 250, 4e3, 1e5]) {
      rule.at(s, out);
      // (e^{z 3} - 1) / z with z = is - theta, times theta
      const er = Math.exp(-theta * 3);
      const nr = er * Math.cos(3 * s) - 1;
      const ni = er * Math.sin(3 * s);
      const d = theta * theta + s * s;
      const vr = (theta * (nr * -theta + ni * s)) / d;
      const vi = (theta * (ni * -theta - nr * s)) / d;
      const e = Math.hypot(out[0] - vr, out[1] - vi);
      expect(e, `s = ${s}: ${out[0]} + ${out[1]}i against ${vr} + ${vi}i`).toBeLessThanOrEqual(rule.error);
    }
  });
});

describe("per-claim layer CF at high frequencies", () => {
  it("exponential(1.5) claims, deductible 0.4, limit 2, share 0.5: closed form (common practice) at t up to 2e4, within the declared cfAbsError", () => {
    const rate = 1.5;
    const d = 0.4;
    const l = 2;
    const c = 0.5;
    const m = compile({ layer: { deductible: d, limit: l, share: c }, of: { family: "exponential", rate } });
    const ts = [0.5, 40, 900, 2e4];
    const re = new Float64Array(ts.length);
    const im = new Float64Array(ts.length);
    m.cf(Float64Array.from(ts), re, im);
    ts.forEach((t, k) => {
      // E e^{itY} = F(d) + e^{-rate d} int_0^l e^{itcu} rate e^{-rate u} du + e^{-rate (d + l)} e^{itcl}
      const s = c * t;
      const ed = Math.exp(-rate * d);
      const el = Math.exp(-rate * l);
      const nr = el * Math.cos(s * l) - 1;
      const ni = el * Math.sin(s * l);
      const q = rate * rate + s * s;
      const ir = (rate * (nr * -rate + ni * s)) / q;
      const ii = (rate * (ni * -rate - nr * s)) / q;
      const vr = 1 - ed + ed * ir + ed * el * Math.cos(s * l);
      const vi = ed * ii + ed * el * Math.sin(s * l);
      const e = Math.hypot(re[k] - vr, im[k] - vi);
      expect(e, `t = ${t}`).toBeLessThanOrEqual(m.cfAbsError ?? 0);
    });
    expect(m.cfAbsError).toBeLessThan(1e-12);
  });
});
