// npm run bench:bounds — how honest and how tight the engine's stated error bounds are, on every reference fixture
// under tests/fixtures/ (each generated outside the engine by the generator beside it). For each fixture set and
// quantity (pdf/pmf, cdf, sf, quantile, ES, moments) it prints the number of values, the worst actual/bound ratio
// (above 1 is a broken bound: listed loudly at the end), and the worst and median bound/actual looseness (the aim
// is within 100x). Values whose actual error is 0 or below the reference's own precision (its cross-check
// difference, its digits, or the rounding of the reference to a double) cannot measure looseness; they are counted
// apart, and so are far-tail points (reference cdf or sf below 1e-6), where an absolute bound cannot follow the value.
// A model's points go in one call and its levels in another, as a client asks (BOUND_AUDIT_PER_POINT=1: one call per
// point, each value's own best bound). Moments carry no bound in the engine's answer: their actual relative errors are
// printed, flagged. Pure lib/cf; every call runs under a deadline (BOUND_AUDIT_DEADLINE_MS, default 300 s wall).
import { DEADLINE_MS, failures, ONLY, PER_POINT, QUANTITIES, samples, slow, TAIL } from "./lib/bound-audit-core";
import { SETS } from "./lib/bound-audit-sets";
// ---- the table ---------------------------------------------------------------------------------------------

const median = (xs: number[]) => {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : Math.sqrt(s[m - 1] * s[m]);
};
const fmt = (v: number) => (Number.isNaN(v) ? "-" : v === Infinity ? "inf" : v === 0 ? "0" : v.toExponential(1));

const t0 = process.cpuUsage();
for (const [name, run] of SETS) {
  if (ONLY && !name.includes(ONLY)) continue;
  const c = process.cpuUsage();
  run();
  const d = process.cpuUsage(c);
  console.error(`${name}: ${((d.user + d.system) / 1e6).toFixed(1)} s CPU`);
}
const cpu = process.cpuUsage(t0);

const header = ["set", "quantity", "n", "worst act/bound", "floor", "worst bound/act", "median bound/act", ">100x", "tail n", "tail bound>|value|", "bound inf"];
const rows: string[][] = [];
const violations: string[] = [];
const loose: string[] = [];
const worstAt = new Map<string, string>();
const sets = [...new Set(samples.map((s) => s.set))];
for (const set of sets) {
  for (const quantity of QUANTITIES) {
    const xs = samples.filter((s) => s.set === set && s.quantity === quantity);
    if (!xs.length) continue;
    let worstRatio = 0;
    let floor = 0;
    let over100 = 0;
    let tail = 0;
    let tailUseless = 0;
    let infinite = 0;
    const looseness: number[] = [];
    const noBound = xs.every((s) => Number.isNaN(s.bound));
    for (const s of xs) {
      const actual = Math.abs(s.got - s.want);
      if (!Number.isFinite(s.got)) {
        violations.push(`${set} ${quantity} ${s.label}: the engine answered ${s.got} (reference ${s.want})`);
        continue;
      }
      if (Number.isNaN(s.bound)) {
        // moments: no bound travels with them; the relative error stands in the looseness columns
        if (actual > s.refErr) looseness.push(actual / Math.abs(s.want || 1));
        else floor++;
        continue;
      }
      if (s.bound === Infinity) {
        // an unresolved value says so with an infinite bound: honest, but it bounds nothing
        infinite++;
        continue;
      }
      // a bound is broken only when the difference exceeds it by more than the reference's own uncertainty
      const ratio = s.bound > 0 ? Math.max(actual - s.refErr, 0) / s.bound : actual > s.refErr ? Infinity : 0;
      if (ratio > worstRatio) worstAt.set(`${set} ${quantity}`, `${set} ${quantity} ${s.label}: actual/bound ${ratio.toFixed(3)} (engine ${s.got}, reference ${s.want}, actual ${actual.toExponential(3)}, bound ${s.bound.toExponential(3)})`);
      worstRatio = Math.max(worstRatio, ratio);
      if (ratio > 1)
        violations.push(`${set} ${quantity} ${s.label}: engine ${s.got}, reference ${s.want}, actual ${actual.toExponential(3)}, stated bound ${s.bound.toExponential(3)}, reference uncertainty ${s.refErr.toExponential(2)}`);
      if (s.tail) {
        tail++;
        if (s.bound > Math.abs(s.want)) tailUseless++;
        continue;
      }
      if (actual <= s.refErr) {
        floor++;
        continue;
      }
      const l = s.bound / actual;
      looseness.push(l);
      if (l > 100) {
        over100++;
        loose.push(`${set} ${quantity} ${s.label}: bound/actual ${l.toExponential(2)} (actual ${actual.toExponential(2)}, bound ${s.bound.toExponential(2)}, reference ${s.want})`);
      }
    }
    if (noBound)
      rows.push([set, quantity, String(xs.length), "NO BOUND", String(floor), `rel err ${fmt(looseness.length ? Math.max(...looseness) : NaN)}`, `rel err ${fmt(median(looseness))}`, "-", "-", "-", "-"]);
    else
      rows.push([set, quantity, String(xs.length), fmt(worstRatio) + (worstRatio > 1 ? " !!" : ""), String(floor), fmt(looseness.length ? Math.max(...looseness) : NaN), fmt(median(looseness)), String(over100), String(tail), String(tailUseless), String(infinite)]);
  }
}

const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
const line = (r: string[]) => "| " + r.map((c, i) => c.padEnd(widths[i])).join(" | ") + " |";
console.log(`bound audit at ${new Date().toISOString()}: ${samples.length} values from ${sets.length} fixture sets, ${PER_POINT ? "one call per point" : "one call per model"}, ${((cpu.user + cpu.system) / 1e6).toFixed(1)} s CPU`);
console.log(
  `actual = |engine - reference|; floor = values whose actual error is 0 or within the reference's own precision; tail = points whose reference cdf or sf is below ${TAIL} (neither is in the looseness columns; "tail bound>|value|" counts tail values whose bound exceeds the value itself); a value whose answer carries no bound shows its relative error in the looseness columns ("NO BOUND")`,
);
console.log(line(header));
console.log("|" + widths.map((w) => "-".repeat(w + 2)).join("|") + "|");
for (const r of rows) console.log(line(r));
if (slow.length) {
  console.log(`\n${slow.length} calls took over 2 s of CPU:`);
  for (const s of slow) console.log("  " + s);
}
if (failures.length) {
  console.log(`\n${failures.length} calls failed (deadline ${DEADLINE_MS} ms or refusal):`);
  for (const f of failures) console.log("  " + f);
}
if (process.env.BOUND_AUDIT_VERBOSE) {
  console.log(`\ntightest bound per row (the worst act/bound column):`);
  for (const w of worstAt.values()) console.log("  " + w);
}
if (loose.length && process.env.BOUND_AUDIT_VERBOSE) {
  console.log(`\nlooser than 100x (${loose.length}):`);
  for (const l of loose) console.log("  " + l);
}
if (violations.length) {
  console.log(`\n!!! ${violations.length} BOUND VIOLATIONS (actual error above the stated bound):`);
  for (const v of violations) console.log("  !!! " + v);
  process.exitCode = 1;
} else console.log("\nno bound below its actual error");
