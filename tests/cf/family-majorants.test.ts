import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

// |phi(t)| and |E X e^{itX}| on a geometric grid (3 per octave, t in [0.05, 2000]) from
// tests/fixtures/cf-abs/generate.py (cf-abs.json and cf-abs-2.json): mpmath 1.3 at 30 digits (quadosc/quad, or closed forms), cross-checked against a
// second method (closed forms or scipy.integrate.quad; the difference is in each row). The majorants are derived in
// lib/cf/family-majorants.ts and lib/cf/lognormal-majorant.ts; each must be at least the reference at every grid point
// s >= t, and its stated tail power must hold on the grid. The reference is taken less 1e-25 (its absolute precision).
interface Row {
  t: number;
  abs: number;
  absDiff?: number;
  absMoment?: number;
  absMomentDiff?: number;
}
interface Case {
  family: string;
  params: Record<string, number>;
  rows: Row[];
}
const load = (f: string) => JSON.parse(readFileSync(join(__dirname, "../fixtures/cf-abs", f), "utf8")) as { source: string; cases: Case[] };
// cf-abs-2.json: the families with first-order majorants (generate.py with CASESET=2)
const sets = [load("cf-abs.json"), load("cf-abs-2.json")];
const fixture = { source: sets[0].source, cases: sets.flatMap((s) => s.cases) };
const SLACK = 1e-25;

describe(`family majorants of |phi| and |phi'| (reference: ${fixture.source})`, () => {
  for (const cs of fixture.cases) {
    const label = `${cs.family}(${Object.values(cs.params).join(", ")})`;
    it(`${label}: M(t) >= |phi(s)| for grid s >= t, and the tail power holds`, () => {
      const m = compile({ family: cs.family, ...cs.params } as unknown as Model);
      const maj = m.logAbsMajorant!;
      const c = new Checker();
      c.that("has a majorant", !!maj);
      const t = Float64Array.from(cs.rows.map((r) => r.t));
      const lm = new Float64Array(t.length);
      maj(t, lm);
      let sup = 0;
      for (let i = t.length - 1; i >= 0; i--) {
        sup = Math.max(sup, cs.rows[i].abs - SLACK);
        c.that(`M(${t[i]})`, Math.exp(lm[i]) >= sup, `M ${Math.exp(lm[i])} below sup |phi| ${sup}`);
        const tail = maj.tail!(t[i]);
        for (let j = i; j < t.length; j++) {
          const b = Math.exp(tail.log) * Math.pow(t[i] / t[j], tail.q);
          c.that(`tail from ${t[i]} at ${t[j]}`, b >= cs.rows[j].abs - SLACK, `bound ${b} (q ${tail.q}) below |phi| ${cs.rows[j].abs}`);
        }
      }
      c.done();
    });
    if (cs.rows.some((r) => r.absMoment !== undefined)) {
      it(`${label}: the slope S(t) >= |phi'(s)| = |E X e^{isX}| for grid s >= t`, () => {
        const m = compile({ family: cs.family, ...cs.params } as unknown as Model);
        const sl = m.logAbsMajorant!.slope!;
        const c = new Checker();
        c.that("slope about 0", sl.center === 0, String(sl.center));
        const t = Float64Array.from(cs.rows.map((r) => r.t));
        const s = new Float64Array(t.length);
        sl.at(t, s);
        let sup = 0;
        for (let i = t.length - 1; i >= 0; i--) {
          sup = Math.max(sup, cs.rows[i].absMoment! - SLACK);
          c.that(`S(${t[i]})`, s[i] >= sup, `S ${s[i]} below sup |phi'| ${sup}`);
        }
        c.done();
      });
    }
  }
});
