// Cumulants of a truncated normal beyond order 24, alone and in a sum: the sum asks every term for as many cumulants as
// it needs (the moment tail bounds go to order 40), and the truncated normal gave only 24, so a sum with one had NaN
// beyond order 24 and its error bounds threw. Reference: tests/fixtures/moments/truncnorm-high.json
// (generate_truncnorm.py --high: mpmath at 40 digits, quadrature and the JKB recursion). A normal's cumulants beyond
// the second are 0 (common practice), so the sum's are the truncated normal's plus (mu, sigma^2) in the first two.
import { describe, expect, it } from "vitest";
import { compile } from "@/lib/cf";
import type { Model } from "@/lib/cf/types";
import ref from "../fixtures/moments/truncnorm-high.json";

const val = (p: number[] | null) => (p ? p[0] + p[1] : NaN);

describe("truncated normal cumulants to order 30 (mpmath)", () => {
  for (const c of ref.cases) {
    for (const inSum of [false, true]) {
      it(`${c.name}${inSum ? " + normal(0.5, 1)" : ""}`, () => {
        const model = (inSum ? { sum: [c.model, { family: "normal", mu: 0.5, sigma: 1 }] } : c.model) as Model;
        const m = compile(model);
        const k = m.cumulants(30);
        const e = m.cumulantErrors!(30);
        expect(k.length).toBe(30);
        for (let j = 0; j < 30; j++) {
          const expected = val(c.cumulants[j]) + (inSum ? (j === 0 ? 0.5 : j === 1 ? 1 : 0) : 0);
          const v = k[j] as number;
          const b = e[j] as number;
          const msg = `order ${j + 1}: value ${v}, reference ${expected}, bound ${b}`;
          expect(Number.isFinite(v) && Number.isFinite(b), msg).toBe(true);
          // the bound covers the actual error (plus the 32-digit reference's own rounding)
          expect(Math.abs(v - expected), msg).toBeLessThanOrEqual(b + 1e-30 * Math.abs(expected));
        }
      });
    }
  }
});
