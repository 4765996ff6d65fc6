// Lattice laws inverted by FFT of the CF (lattice-fft: the aliasing bound, mass outside the window from the law's moments)
// or tabulated (lattice-table: reflected laws' tables reversed, their dropped mass below the origin, per-point bounds from
// the entries' own; a compound whose severity has points below 0 by whole powers), each law also by FFT with its table
// withheld, and the pmf/cdf/sf bounds against mpmath references (tests/fixtures/lattice-alias/generate.py: closed forms
// vs recursions / incomplete gamma and beta / convolutions, the cross-check difference written per point).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import type { Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

interface Row {
  x: number;
  pmf: string;
  cdf: string;
  sf: string;
  crossCheck: number;
}
interface Case {
  name: string;
  model: Model;
  source: string;
  points: Row[];
}
const FIX = JSON.parse(readFileSync(join(import.meta.dirname, "../fixtures/lattice-alias/lattice-alias.json"), "utf8")) as { cases: Case[] };

/** a reference read into a double is known to the cross-check difference plus one rounding */
const refErr = (r: Row, v: number) => r.crossCheck + 2 ** -53 * Math.abs(v);

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length ? s[s.length >> 1] : NaN;
};

describe("lattice laws by FFT or table: stated bounds hold against mpmath references (tests/fixtures/lattice-alias)", () => {
  for (const k of FIX.cases) {
    for (const [tolerance, fft] of [
      [1e-10, false],
      [1e-13, false],
      [1e-10, true],
      [1e-13, true],
    ] as const) {
      it(`${k.name}, tolerance ${tolerance}${fft ? ", by FFT (the table withheld)" : ""} (${k.source})`, () => {
        const c = new Checker();
        const xs = k.points.map((p) => p.x);
        const compiled = compile(k.model);
        // every law here has a table; withheld, the same law goes by FFT of its CF
        const r = density(fft ? { ...compiled, latticeTable: undefined } : compiled, { x: xs, tolerance });
        const e = r.diagnostics.error;
        const table = r.diagnostics.method === "lattice-table";
        c.that("method", r.diagnostics.method === (fft ? "lattice-fft" : "lattice-table"), r.diagnostics.method);
        c.that("bounds finite", Number.isFinite(e.pdf) && Number.isFinite(e.cdf), `pdf ${e.pdf} cdf ${e.cdf}`);
        // the window's outside mass: the reference's mass below range.from and above range.to, when the points reach them
        // (a table's dropped mass is its truncation: 1 - capturedMass loses it below u)
        const { from, to } = r.diagnostics.range;
        const outside = table ? e.truncation : 1 - r.diagnostics.capturedMass;
        const left = k.points.find((p) => p.x === from - 1);
        const right = k.points.find((p) => p.x === to);
        if (left) c.that(`mass below ${from} within the bound ${outside}`, Number(left.cdf) <= outside + left.crossCheck, left.cdf);
        if (right) c.that(`mass above ${to} within the bound ${outside}`, Number(right.sf) <= outside + right.crossCheck, right.sf);
        const loose: number[] = [];
        // each value's bound as the API answers it: its point bound where the route gives one (at most the whole answer's)
        const pe = r.diagnostics.pointError;
        if (table) c.that("a table's answer carries point bounds", pe !== undefined);
        k.points.forEach((p, i) => {
          if (pe) c.that(`point bounds within the whole answer's at x = ${p.x}`, pe.pdf[i] <= e.pdf && pe.cdf[i] <= e.cdf && pe.sf[i] <= e.cdf);
          for (const [q, got, want, bound] of [
            ["pmf", r.pmf![i], Number(p.pmf), pe ? pe.pdf[i] : e.pdf],
            ["cdf", r.cdf[i], Number(p.cdf), pe ? pe.cdf[i] : e.cdf],
            ["sf", r.sf[i], Number(p.sf), pe ? pe.sf[i] : e.cdf],
          ] as const) {
            const slack = refErr(p, want);
            c.honest(`${q} at x = ${p.x}`, got, want, bound + slack);
            const actual = Math.abs(got - want);
            // far-tail points (reference cdf or sf below 1e-6) are left out: an absolute bound cannot follow their value
            if (actual > 4 * slack && Number(p.cdf) >= 1e-6 && Number(p.sf) >= 1e-6) loose.push(bound / actual);
          }
        });
        // not uselessly loose: the median bound/actual where the actual error is measurable (the rounding bound is
        // derived for the worst case of every term, so it stays well above the typical error)
        if (loose.length) c.that(`median bound/actual ${median(loose).toExponential(2)} <= 1e4`, median(loose) <= 1e4);
        c.done();
      });
    }
  }
});
