// npm run bench:cf-compound-lognormal — Poisson and negative binomial compounds of lognormal claims with sigma >= 2
// against the mpmath Laplace-inversion references (tests/fixtures/compound/compound-wide.json and compound-wide-nb.json):
// per level, the route, the quantile's and ES's relative error against the reference and their stated relative bounds,
// and the CPU time (process.cpuUsage: the machine is shared, wall time inflates). Each level alone, a fresh compile
// each time (no cached setups). By default only the levels the damped route takes; `--all` adds the rest (several seconds
// a level on the undamped route), `--sigma=<s>` keeps one severity width.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { compile } from "@/lib/cf/compile";
import { clearDeadline, setDeadline } from "@/lib/cf/deadline";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";

interface Case {
  model: Model;
  levels: { p: number; q: number; es: number | null }[];
}
const read = (f: string) => (JSON.parse(readFileSync(join(import.meta.dirname, "../tests/fixtures/compound", f), "utf8")) as { lognormal: Case[] }).lognormal;
const all = process.argv.includes("--all");
const onlySigma = process.argv.find((a) => a.startsWith("--sigma="))?.slice(8);
const sigmaOf = (c: Case) => (c.model as unknown as { compound: { each: { sigma: number } } }).compound.each.sigma;
const cases = [...read("compound-wide.json"), ...read("compound-wide-nb.json")].filter((c) => sigmaOf(c) >= 2 && (!onlySigma || sigmaOf(c) === Number(onlySigma)));
// the levels past the damped route's budget of terms (the undamped route answers them): skipped unless --all. The
// negative binomial compounds at 0.9999; the Poisson ones take the damped route at every level since the truncated sums
// are bounded by parts (lib/cf/invert/damped-slope.ts)
const countOf = (c: Case) => (c.model as unknown as { compound: { count: { family: string } } }).compound.count.family;
const undamped = (c: Case, p: number) => countOf(c) === "negative_binomial" && p >= 0.9999;

console.log("model | p | route | quantile rel. error (bound) | ES rel. error (bound) | CPU ms");
for (const c of cases) {
  const sigma = sigmaOf(c);
  const name = JSON.stringify((c.model as unknown as { compound: { count: unknown } }).compound.count) + ` x lognormal(0, ${sigma})`;
  for (const l of c.levels) {
    if (!(l.q > 0) || (!all && undamped(c, l.p))) continue;
    const m = compile(c.model);
    const c0 = process.cpuUsage();
    setDeadline(Date.now() + 120_000);
    try {
      const r = quantiles(m, [l.p], { expectedShortfall: true });
      const d = process.cpuUsage(c0);
      const qe = Math.abs(r.x[0] - l.q) / l.q;
      const qb = r.diagnostics.quantileError[0] / l.q;
      const es = r.expectedShortfall?.[0] ?? NaN;
      const ee = l.es !== null ? Math.abs(es - l.es) / l.es : NaN;
      const eb = l.es !== null ? (r.diagnostics.expectedShortfallError?.[0] ?? NaN) / l.es : NaN;
      const flag = qe > qb || ee > eb ? "  BOUND BROKEN" : qe > 1e-7 || ee > 1e-6 ? "  (target missed)" : "";
      console.log(
        `${name} | ${l.p} | ${r.diagnostics.method} | ${qe.toExponential(1)} (${qb.toExponential(1)}) | ${ee.toExponential(1)} (${eb.toExponential(1)}) | ${((d.user + d.system) / 1000).toFixed(0)}${flag}`,
      );
    } catch (e) {
      const d = process.cpuUsage(c0);
      console.log(`${name} | ${l.p} | failed: ${(e as Error).message} | | | ${((d.user + d.system) / 1000).toFixed(0)}`);
    } finally {
      clearDeadline();
    }
  }
}
