// npm run bench:cf-models — the models people send: a seeded set of sums, mixes and compounds of heavy families
// (up to 8 terms, one level of nesting), seven quantiles with expected shortfall and a 1000-point density each, at
// the default tolerance; then Poisson-lognormal compounds (cdf on a 4096-point grid at 1e-9, 1000 arbitrary points,
// the quantile triple with ES). Prints median and worst times (the worst is the figure that counts), the model
// behind the worst and every model over its target by CPU time (the targets are CPU times: the machine is shared).
// BENCH_MODELS, BENCH_SEED, BENCH_DEADLINE_MS, BENCH_WARM (see below), BENCH_SKIP_LOGNORMAL=1; BENCH_PART=random or
// BENCH_PART=poisson-lognormal runs one part alone, BENCH_PLN_LAMBDAS / BENCH_PLN_SIGMAS (comma lists) choose the
// compounds, BENCH_SEVERITIES=all lets the random compounds draw pareto and weibull claims too (default: lognormal,
// gamma and exponential claims, the set the earlier figures were taken on), BENCH_ROWS=1 prints each compound's CPU times and bounds, BENCH_REPEAT=n times each Poisson-lognormal call n
// times (a fresh compile each) and keeps the least CPU time (default 1). The timed calls follow the warm-up a server's
// compute threads run at start (lib/compute/warm.ts; BENCH_COLD=1 leaves it out). Pure lib/cf and lib/api/operations.
import { loadavg } from "node:os";
import { compile } from "@/lib/cf/compile";
import { clearDeadline, setDeadline } from "@/lib/cf/deadline";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";
import { warmEngine } from "@/lib/compute/warm";
import { randomModel, rng } from "../tests/support/random-models";

const SEVEN = [0.001, 0.01, 0.1, 0.5, 0.9, 0.99, 0.999];
const TRIPLE = [0.99, 0.995, 0.999];
const count = Number(process.env.BENCH_MODELS ?? 40);
const seed = Number(process.env.BENCH_SEED ?? 20261203);
const deadlineMs = Number(process.env.BENCH_DEADLINE_MS ?? 60000);
const part = process.env.BENCH_PART ?? "all";
const list = (v: string | undefined, d: number[]) => (v ? v.split(",").map(Number) : d);
const plnLambdas = list(process.env.BENCH_PLN_LAMBDAS, [0.1, 1, 10, 100, 1000]);
const plnSigmas = list(process.env.BENCH_PLN_SIGMAS, [0.5, 1, 1.5]);
const printRows = process.env.BENCH_ROWS === "1";
const repeat = Math.max(1, Number(process.env.BENCH_REPEAT ?? 1));
const allSeverities = process.env.BENCH_SEVERITIES === "all";

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/** wall-clock ms and the CPU ms of this process (user + system): on a loaded machine the CPU time shows the cost */
function timed<T>(fn: () => T): { ms: number; cpu: number; value: T | null; error?: string } {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  // one slow model cannot hold the bench: past the deadline it stops and counts with its time and the error
  setDeadline(Date.now() + deadlineMs);
  const done = () => {
    clearDeadline();
    const d = process.cpuUsage(c0);
    return { ms: performance.now() - t0, cpu: (d.user + d.system) / 1000 };
  };
  try {
    const value = fn();
    return { ...done(), value };
  } catch (e) {
    return { ...done(), value: null, error: (e as Error).message };
  }
}

function report(label: string, target: number, rows: { ms: number; cpu: number; model: Model; error?: string }[]) {
  if (rows.length === 0) return;
  const ms = rows.map((r) => r.ms);
  const worst = rows.reduce((a, b) => (b.ms > a.ms ? b : a));
  const worstCpu = rows.reduce((a, b) => (b.cpu > a.cpu ? b : a));
  const over = rows.filter((r) => r.cpu > target).length;
  console.log(
    `${label}: median ${median(ms).toFixed(1)} ms, worst ${worst.ms.toFixed(1)} ms (target <= ${target} ms CPU; ${over}/${rows.length} over by CPU); ` +
      `CPU median ${median(rows.map((r) => r.cpu)).toFixed(1)} ms, worst ${worstCpu.cpu.toFixed(1)} ms (load ${loadavg()[0].toFixed(1)})`,
  );
  console.log(`  worst model: ${JSON.stringify(worst.model)}${worst.error ? ` (error: ${worst.error})` : ""}`);
  if (worstCpu !== worst) console.log(`  worst model by CPU: ${JSON.stringify(worstCpu.model)}${worstCpu.error ? ` (error: ${worstCpu.error})` : ""}`);
  // every model over the target by CPU, slowest first, so the causes can be grouped
  for (const r of [...rows].filter((r) => r.cpu > target).sort((a, b) => b.cpu - a.cpu))
    console.log(`  over: CPU ${r.cpu.toFixed(1)} ms ${JSON.stringify(r.model)}${r.error ? ` (error: ${r.error})` : ""}`);
  const errs = rows.filter((r) => r.error);
  if (errs.length) console.log(`  ${errs.length} error(s), e.g. ${errs[0].error}`);
}

// warm the JIT on a small model (not one of the timed ones) through each kind of call the bench times, so the first
// timed model is not charged for compiling the code paths every later one shares
{
  const wm: Model = { compound: { count: { family: "poisson", lambda: 3 }, each: { family: "lognormal", mu: 0, sigma: 0.8 } } };
  const w = compile(wm);
  quantiles(w, SEVEN, { expectedShortfall: true });
  density(w, { grid: { from: 0, to: 20, count: 1000 } });
  density(compile(wm), { grid: { from: 0, to: 20, count: 4096 }, tolerance: 1e-9, cdfOnly: true });
  density(compile(wm), { x: Array.from({ length: 1000 }, (_, i) => 0.02 * i), tolerance: 1e-9 });
  quantiles(compile(wm), TRIPLE, { expectedShortfall: true });
}

// the warm-up every compute thread runs when the server starts (lib/compute/warm.ts), so the timed calls meet the
// engine as a server thread's first requests do; BENCH_COLD=1 leaves it out (a thread's very first calls)
const cold = process.env.BENCH_COLD === "1";
const engineWarm = cold ? null : warmEngine();

// BENCH_WARM=n: first run n models of another seed (not timed), so that the timed set meets a process whose code paths
// are compiled, as a server's is after its first requests; the per-law caches do not carry over (other parameters)
const warm = part === "poisson-lognormal" ? 0 : Number(process.env.BENCH_WARM ?? 0);
{
  const rw = rng(seed + 1);
  for (let i = 0; i < warm; i++) {
    const c = compile(randomModel(rw, 8, true, allSeverities));
    timed(() => quantiles(c, SEVEN, { expectedShortfall: true }));
    timed(() => density(c, { grid: { from: c.location - 4 * c.scale, to: c.location + 8 * c.scale, count: 1000 } }));
  }
}

const r = rng(seed);
type Row = { ms: number; cpu: number; model: Model; error?: string };
const qRows: Row[] = [];
const dRows: Row[] = [];
for (let i = 0; part !== "poisson-lognormal" && i < count; i++) {
  const model = randomModel(r, 8, true, allSeverities);
  const c = compile(model);
  const q = timed(() => quantiles(c, SEVEN, { expectedShortfall: true }));
  qRows.push({ ms: q.ms, cpu: q.cpu, model, error: q.error });
  const d = timed(() => density(c, { grid: { from: c.location - 4 * c.scale, to: c.location + 8 * c.scale, count: 1000 } }));
  dRows.push({ ms: d.ms, cpu: d.cpu, model, error: d.error });
}
if (part !== "poisson-lognormal") {
  console.log(
    `seed ${seed}, ${count} random models (sums, mixes, compounds, scales, shifts; up to 8 terms` +
      (allSeverities ? "; claims include pareto and weibull)" : ")") +
      (engineWarm ? `, after the compute threads' warm-up (${engineWarm.done} calls, ${engineWarm.ms} ms)` : ", cold (BENCH_COLD=1)") +
      (warm ? `, after ${warm} untimed models of seed ${seed + 1}` : ""),
  );
  report("seven quantiles with ES", 200, qRows);
  report("1000-point density", 100, dRows);
}

const lnRows: Record<string, Row[]> = { grid: [], points: [], triple: [] };
// BENCH_SKIP_LOGNORMAL=1 leaves out the Poisson-lognormal rows (when working on the general models only)
for (const lambda of process.env.BENCH_SKIP_LOGNORMAL || part === "random" ? [] : plnLambdas) {
  for (const sigma of plnSigmas) {
    const model = { compound: { count: { family: "poisson", lambda }, each: { family: "lognormal", mu: 0, sigma } } } as Model;
    // a fresh compile for each timed call, as each API request compiles its model: nothing cached on the model by an
    // earlier call is charged to a later one
    const hi = quantiles(compile(model), [0.9999]).x[0];
    // the least CPU time of `repeat` calls, each on a fresh compile
    const least = <T>(fn: (c: ReturnType<typeof compile>) => T) => {
      let best: ReturnType<typeof timed<T>> | null = null;
      for (let i = 0; i < repeat; i++) {
        const c = compile(model);
        const r = timed(() => fn(c));
        if (!best || r.cpu < best.cpu) best = r;
      }
      return best!;
    };
    const g = least((c) => density(c, { grid: { from: 0, to: hi, count: 4096 }, tolerance: 1e-9, cdfOnly: true }));
    lnRows.grid.push({ model, ...g });
    const xs = Array.from({ length: 1000 }, (_, i) => (hi * (i + 0.5)) / 1000);
    const p = least((c) => density(c, { x: xs, tolerance: 1e-9 }));
    lnRows.points.push({ model, ...p });
    const t = least((c) => quantiles(c, TRIPLE, { expectedShortfall: true }));
    lnRows.triple.push({ model, ...t });
    if (printRows) {
      const gb = g.value ? g.value.diagnostics.error.cdf : NaN;
      const pb = p.value ? p.value.diagnostics.error.cdf : NaN;
      const tb = t.value ? Math.max(...t.value.diagnostics.quantileError) : NaN;
      console.log(
        `  lambda ${lambda} sigma ${sigma}: grid CPU ${g.cpu.toFixed(1)} ms (cdf bound ${gb.toExponential(2)}${g.error ? `, error: ${g.error}` : ""}), ` +
          `points ${p.cpu.toFixed(1)} ms (cdf bound ${pb.toExponential(2)}${p.error ? `, error: ${p.error}` : ""}), ` +
          `triple ${t.cpu.toFixed(1)} ms (quantile bound ${tb.toExponential(2)}${t.error ? `, error: ${t.error}` : ""})`,
      );
    }
  }
}
report("Poisson(lambda <= 1000)-lognormal cdf, 4096-point grid at 1e-9", 50, lnRows.grid);
report("Poisson-lognormal, 1000 arbitrary points at 1e-9", 30, lnRows.points);
report("Poisson-lognormal quantile triple (0.99, 0.995, 0.999) with ES", 30, lnRows.triple);
