// Panjer's recursion with its running error bound (lib/cf/panjer.ts): every table entry within the derived bound of the
// exact compound pmf, against mpmath references (tests/fixtures/panjer-bounds/generate.py: closed-form n-fold laws,
// cross-checked by the recursion in 50-digit arithmetic), and the bound within a useful factor of the actual error.
import { readFileSync } from "node:fs";
import { afterAll, describe, expect, it } from "vitest";
import { compile } from "@/lib/cf";
import { record, worst } from "./model-assert";

interface Case {
  name: string;
  count: { family: string; lambda?: number; r?: number; p?: number; p0?: number; base?: { lambda: number } };
  severity: { kind: "geometric" | "poisson"; th?: number; mu?: number };
  pmf: string[];
  xerr: string;
  from?: number;
}
const fx: { cases: Case[] } = JSON.parse(readFileSync("tests/fixtures/panjer-bounds/panjer-bounds.json", "utf8"));

function modelOf(c: Case): unknown {
  const n = c.count;
  const count =
    n.family === "zm"
      ? { family: "zero_modified_poisson", lambda: n.base!.lambda, p0: n.p0 }
      : n.family === "poisson"
        ? { family: "poisson", lambda: n.lambda }
        : n.family === "logarithmic"
          ? { family: "logarithmic", p: n.p }
          : { family: "negative_binomial", r: n.r, p: n.p };
  // geometric claims on 1, 2, ...: the geometric law (failures before the first success, p = 1 - th) shifted by one
  const each = c.severity.kind === "geometric" ? { shift: 1, of: { family: "geometric", p: 1 - c.severity.th! } } : { family: "poisson", lambda: c.severity.mu };
  return { compound: { count, each } };
}

describe("Panjer table rounding bound vs mpmath compound pmfs (tests/fixtures/panjer-bounds)", () => {
  afterAll(() => console.log("bound / actual:", JSON.stringify(worst)));
  // (cases from index 0; the window about a large count's mode is checked in table-rounding-bounds.test.ts)
  it.each(fx.cases.filter((c) => c.from === undefined).map((c) => [c.name, c] as const))("%s: every entry within round.pmf, the sum within round.l1", (_n, c) => {
    const t = compile(modelOf(c)).latticeTable!(4096)!;
    // a dropped bound fails here: the table must carry its derived rounding
    expect(t.round, "derived rounding bound").toBeDefined();
    const ref = c.pmf.map(Number);
    const xerr = Number(c.xerr);
    let worstPmf = 0;
    let l1 = 0;
    for (let k = 0; k < ref.length; k++) {
      const d = Math.abs(t.p[k] - ref[k]);
      // the reference is a 25-digit string: its own error (and xerr) far below a double's rounding
      if (d > t.round!.pmf + xerr) throw new Error(`${c.name} k=${k}: |${t.p[k]} - ${ref[k]}| = ${d} > bound ${t.round!.pmf}`);
      worstPmf = Math.max(worstPmf, d);
      l1 += d;
    }
    expect(l1).toBeLessThanOrEqual(t.round!.l1 + ref.length * xerr);
    // useful: within 200x of the actual error (actual at least an ulp of the largest entry, 2^-53)
    const floor = Math.max(worstPmf, 2 ** -53 * Math.max(...ref));
    record(`pmf ${c.name}`, t.round!.pmf / floor);
    expect(t.round!.pmf / floor, `${c.name}: bound ${t.round!.pmf}, actual ${worstPmf}`).toBeLessThan(200);
  });
});
