// npm run bench:direct (BENCH_DIRECT_ONLY=<section> for one section) — single named laws through lib/cf's public entry points, answered without CF inversion:
// stable laws at 1 000 arbitrary points (body and far tails, |x| up to 1e8), and seven quantiles (with ES) of single
// families. Prints medians (wall clock) and the CPU time per call, so that a loaded machine still shows the cost.
import { readFileSync } from "node:fs";
import { cpus, loadavg } from "node:os";
import { compile } from "@/lib/cf/compile";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import type { Model } from "@/lib/cf/types";

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/** median wall ms and median CPU ms (user + system of this process) over runs after warm-up */
function time(fn: () => unknown, runs = 7, warm = 1): { wall: number; cpu: number; cpuMin: number; worst: number } {
  for (let i = 0; i < warm; i++) fn();
  const w: number[] = [];
  const c: number[] = [];
  for (let i = 0; i < runs; i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    fn();
    w.push(performance.now() - t0);
    const d = process.cpuUsage(c0);
    c.push((d.user + d.system) / 1000);
  }
  return { wall: median(w), cpu: median(c), cpuMin: Math.min(...c), worst: Math.max(...w) };
}

let seed = 20261203;
const rnd = () => {
  seed = (seed * 1103515245 + 12345) % 2147483648;
  return seed / 2147483648;
};
/** half the points log-uniform in |x| over [1e-3, 1e8] with random sign, half uniform in [-10, 10] */
function points(n: number): Float64Array {
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = i % 2 ? (rnd() < 0.5 ? -1 : 1) * 10 ** (-3 + 11 * rnd()) : -10 + 20 * rnd();
  return x;
}

/** BENCH_DIRECT_ONLY=stable|vg-nig|special|quantiles runs that section alone */
const ONLY = process.env.BENCH_DIRECT_ONLY ?? "";
const run = (name: string) => !ONLY || ONLY === name;
console.log(`bench:direct (medians; load average ${loadavg()[0].toFixed(1)} on ${cpus().length} cores)`);
const stable: [number, number, "S0" | "S1"][] = [
  [0.3, 0.5, "S1"],
  [0.5, 0.5, "S1"],
  [0.8, 0, "S1"],
  [0.8, 1, "S0"],
  [1, 0.5, "S1"],
  [1, -0.9, "S0"],
  [1.1, 0.4, "S1"],
  [1.5, 0.7, "S0"],
  [1.5, -1, "S1"],
  [1.9, 0.9, "S1"],
  // the edges: alpha = 1 with |beta| = 1, alpha next to 1 and 2, alpha = 0.3 totally skewed
  [1, 1, "S1"],
  [1, -1, "S0"],
  [0.999, 0.5, "S1"],
  [1.001, -0.5, "S0"],
  [0.3, 1, "S1"],
  [1.999, -1, "S1"],
];
for (const [alpha, beta, param] of run("stable") ? stable : []) {
  const m = compile({ family: "stable", alpha, beta, param } as Model);
  const x = points(1000);
  const first = performance.now();
  const r = density(m, { x });
  const firstMs = performance.now() - first;
  const t = time(() => density(m, { x }));
  console.log(
    `stable(${alpha}, ${beta}, ${param}) 1000 arbitrary points`.padEnd(52) +
      `${t.wall.toFixed(2)} ms wall, ${t.cpu.toFixed(2)} ms cpu (least ${t.cpuMin.toFixed(2)}; first call with node set-up ${firstMs.toFixed(1)} ms)  ` +
      `method ${r.diagnostics.method}, max bound pdf ${r.diagnostics.error.pdf!.toExponential(1)} cdf ${r.diagnostics.error.cdf.toExponential(1)}`,
  );
}

// variance-gamma and NIG (density by Bessel K, cdf/sf by the mixture integral): 1 000 points, half far out
const vgNig: Model[] = [
  { family: "variance_gamma", sigma: 0.4, nu: 0.2, theta: 0.1, loc: 0 },
  { family: "variance_gamma", sigma: 1, nu: 2, theta: 0.5, loc: 0 },
  { family: "variance_gamma", sigma: 0.5, nu: 3, theta: -0.4, loc: 0.2 },
  { family: "nig", alpha: 3, beta: 1, delta: 0.8, mu: 0 },
  { family: "nig", alpha: 1.2, beta: -0.7, delta: 2, mu: 0.5 },
] as Model[];
for (const m of run("vg-nig") ? vgNig : []) {
  const c = compile(m);
  // half uniform in [-10, 10], half log-uniform in |x| over [1e-3, 60] with random sign (tails down to ~1e-40 and beyond)
  const x = new Float64Array(1000);
  for (let i = 0; i < 1000; i++) x[i] = i % 2 ? (rnd() < 0.5 ? -1 : 1) * 10 ** (-3 + 4.78 * rnd()) : -10 + 20 * rnd();
  const r = density(c, { x });
  const t = time(() => density(c, { x }));
  console.log(
    `${JSON.stringify(m).slice(0, 70)} 1000 points`.padEnd(88) +
      `${t.wall.toFixed(2)} ms wall, ${t.cpu.toFixed(2)} ms cpu (least ${t.cpuMin.toFixed(2)})  method ${r.diagnostics.method}, max bound pdf ${r.diagnostics.error.pdf!.toExponential(1)} cdf ${r.diagnostics.error.cdf.toExponential(1)}`,
  );
}

// incomplete-gamma and incomplete-beta laws (cdf/sf by lib/cf/families/incgamma-bounded.ts, incbeta-bounded.ts):
// 1 000 points each, half uniform over [0, mean + 8 sd], half log-uniform over [mean/1e3, 50 mean] (both tails, down
// to 1e-300 and below; for the Student t and beta laws some points fall in the far end of the support or beyond)
const incGamma: [Model, number, number][] = [
  [{ family: "gamma", shape: 1.56, rate: 2 } as Model, 0.78, 0.62],
  [{ family: "gamma", shape: 0.3, rate: 1.5 } as Model, 0.2, 0.37],
  [{ family: "gamma", shape: 25, rate: 4 } as Model, 6.25, 1.25],
  [{ family: "chi_squared", k: 7 } as Model, 7, 3.74],
  [{ family: "gamma", shape: 1e4, rate: 1 } as Model, 1e4, 100],
  [{ family: "inverse_gamma", alpha: 3, theta: 2 } as Model, 1, 1],
  [{ family: "student_t", nu: 3.5, loc: 0, scale: 1 } as Model, 1, 1.5],
  [{ family: "student_t", nu: 300, loc: 0, scale: 1 } as Model, 1, 0.5],
  [{ family: "beta", alpha: 2, beta: 3 } as Model, 0.1, 0.1],
  [{ family: "beta", alpha: 50, beta: 20 } as Model, 0.1, 0.1],
];
for (const [m, mean, sd] of run("special") ? incGamma : []) {
  const c = compile(m);
  const x = new Float64Array(1000);
  for (let i = 0; i < 1000; i++) x[i] = i % 2 ? mean * 10 ** (-3 + 4.7 * rnd()) : (mean + 8 * sd) * rnd();
  const r = density(c, { x });
  const t = time(() => density(c, { x }));
  console.log(
    `${JSON.stringify(m)} 1000 points`.padEnd(64) +
      `${t.wall.toFixed(2)} ms wall, ${t.cpu.toFixed(2)} ms cpu (least ${t.cpuMin.toFixed(2)})  method ${r.diagnostics.method}, max bound pdf ${r.diagnostics.error.pdf!.toExponential(1)} cdf ${r.diagnostics.error.cdf.toExponential(1)}`,
  );
}

// accuracy over a sample of the points above (every 100th and 100th + 1 of each of the first ten laws) against the
// mpmath references of tests/fixtures/stable/bench-sample.json (written by tests/fixtures/stable/generate.py --bench)
if (run("stable")) {
  const sample = JSON.parse(readFileSync(new URL("../tests/fixtures/stable/bench-sample.json", import.meta.url), "utf8")) as {
    points: { model: Model & { alpha: number; beta: number; param: string }; x: number; pdf: string; cdf: string; sf: string }[];
  };
  const byLaw = new Map<string, typeof sample.points>();
  for (const r of sample.points) {
    const k = JSON.stringify({ family: "stable", alpha: r.model.alpha, beta: r.model.beta, param: r.model.param });
    byLaw.set(k, [...(byLaw.get(k) ?? []), r]);
  }
  let worstAll = 0;
  for (const [k, rows] of byLaw) {
    const m = compile(JSON.parse(k) as Model);
    const d = density(m, { x: rows.map((r) => r.x) });
    let worstRel = 0;
    let under = 0;
    rows.forEach((r, i) => {
      const e = d.diagnostics.error;
      for (const [v, ref, bound] of [[d.pdf![i], Number(r.pdf), e.pdf!], [d.cdf[i], Number(r.cdf), e.cdf], [d.sf[i], Number(r.sf), e.cdf]]) {
        if (ref > 1e-300) worstRel = Math.max(worstRel, Math.abs(v - ref) / ref);
        if (Math.abs(v - ref) > bound + 1e-18 * ref) under++;
      }
    });
    worstAll = Math.max(worstAll, worstRel);
    const l = rows[0].model;
    console.log(`stable(${l.alpha}, ${l.beta}, ${l.param}) ${rows.length} sampled points vs mpmath`.padEnd(52) + `max relative error (pdf, cdf, sf) ${worstRel.toExponential(1)}, bounds below the error: ${under}`);
  }
  console.log(`stable sampled points: worst relative error ${worstAll.toExponential(1)} (target 1e-6)`);
}

const levels = [0.001, 0.01, 0.1, 0.5, 0.9, 0.99, 0.999];
const singles: Model[] = [
  { family: "pareto", alpha: 1.53, xm: 1.82 },
  { family: "lognormal", mu: 8, sigma: 1.2 },
  { family: "gamma", shape: 1.56, rate: 2 },
  { family: "weibull", shape: 0.7, scale: 3 },
  { family: "student_t", nu: 3.5, loc: 0, scale: 1 },
  { scale: 2, of: { shift: 1, of: { family: "normal", mu: 0, sigma: 1 } } },
  { family: "stable", alpha: 1.28, beta: 0.59 },
  { family: "variance_gamma", sigma: 0.5, nu: 3, theta: -0.4, loc: 0.2 },
  { family: "nig", alpha: 3, beta: 1, delta: 0.8, mu: 0 },
] as Model[];
for (const m of run("quantiles") ? singles : []) {
  const c = compile(m);
  const t = time(() => quantiles(c, levels, { expectedShortfall: true }));
  const r = quantiles(c, levels, { expectedShortfall: true });
  const qe = Math.max(...Array.from(r.diagnostics.quantileError, (e, i) => e / Math.max(1, Math.abs(r.x[i]))));
  console.log(`7 quantiles + ES of ${JSON.stringify(m)}`.slice(0, 90).padEnd(92) + `${t.wall.toFixed(2)} ms wall, ${t.cpu.toFixed(2)} ms cpu  method ${r.diagnostics.method}, max rel quantile bound ${qe.toExponential(1)}`);
}

