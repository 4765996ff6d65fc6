// npm run bench:cf — medians of the numerical core's hot paths, with the bare fft.js transform of the same sizes
// so the overhead over the transform itself shows as a ratio. Pure lib/cf; no database, no server.
import { compile } from "@/lib/cf/compile";
import { getFftPlan, nextPowerOfTwo } from "@/lib/cf/fftplan";
import { density } from "@/lib/cf/invert/density";
import { convolve } from "@/lib/cf/lattice";
import type { Model } from "@/lib/cf/types";

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

const minima = new Map<number, number>();

/** Median wall time in ms of fn over `runs` runs after `warm` warm-up runs (the minimum is kept for the report). */
function time(fn: () => unknown, runs = 31, warm = 5): number {
  for (let i = 0; i < warm; i++) fn();
  const t: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    fn();
    t.push(performance.now() - t0);
  }
  const m = median(t);
  minima.set(m, Math.min(...t));
  return m;
}

function bareFft(n: number): number {
  const plan = getFftPlan(n);
  const inp = new Float64Array(2 * n);
  for (let i = 0; i < 2 * n; i++) inp[i] = Math.sin(i);
  const out = new Float64Array(2 * n);
  return time(() => plan.forward(inp, out), 51, 10);
}

// Ten light-tailed terms (a demo portfolio of our own: claims, delays, measurement noise)
const tenTerms: Model = {
  sum: [
    { family: "normal", mu: 0, sigma: 1 },
    { family: "gamma", shape: 2, rate: 1 },
    { family: "uniform", a: 0, b: 2 },
    { family: "laplace", loc: 0, scale: 1 },
    { family: "logistic", loc: 0, scale: 0.5 },
    { family: "exponential", rate: 1 },
    { family: "normal", mu: 3, sigma: 2 },
    { family: "gamma", shape: 3, rate: 2 },
    { family: "uniform", a: -1, b: 1 },
    { family: "laplace", loc: 1, scale: 0.5 },
  ],
} as Model;
const fourTerms: Model = {
  sum: [
    { family: "normal", mu: 1, sigma: 0.7 },
    { family: "gamma", shape: 2.5, rate: 1.5 },
    { family: "uniform", a: 0, b: 3 },
    { family: "logistic", loc: -1, scale: 0.4 },
  ],
} as Model;
const stableModel: Model = { family: "stable", alpha: 1.5, beta: 0.5, scale: 1, loc: 0 } as Model;

const rows: [string, string][] = [];
const out = (label: string, ms: number, extra = "") =>
  rows.push([label, `${ms.toFixed(3)} ms (min ${(minima.get(ms) ?? ms).toFixed(3)})${extra ? "  " + extra : ""}`]);

// 1. CF of the 10-term sum at 4096 points
const m10 = compile(tenTerms);
const t4096 = new Float64Array(4096);
for (let i = 0; i < 4096; i++) t4096[i] = (i - 2048) * 0.01;
const re = new Float64Array(4096);
const im = new Float64Array(4096);
const cfMs = time(() => m10.cf(t4096, re, im), 101, 10);
out("CF of 10-term sum, 4096 t", cfMs);

// 2. density of that sum on a 4096-point grid (FFT path)
const grid = { from: -15, to: 35, count: 4096 };
const probe = density(m10, { grid });
const densMs = time(() => density(m10, { grid }));
const fftN = probe.diagnostics.gridSize;
const bare1 = bareFft(fftN);
out("density of 10-term sum, 4096-pt grid", densMs, `fft size ${fftN}, ${probe.diagnostics.terms} CF nodes, err est pdf ${probe.diagnostics.error.pdf.toExponential(1)} cdf ${probe.diagnostics.error.cdf.toExponential(1)}`);
out(`  bare fft.js transform N=${fftN} (x2 transforms used)`, bare1, `ratio ${(densMs / bare1).toFixed(1)}x`);

// 3. cdf at 1000 arbitrary points of a 4-term continuous sum at 1e-9
const m4 = compile(fourTerms);
const xs = new Float64Array(1000);
let seed = 12345;
for (let i = 0; i < 1000; i++) {
  seed = (seed * 1103515245 + 12345) % 2147483648;
  xs[i] = -2 + 10 * (seed / 2147483648);
}
const p4 = density(m4, { x: xs, tolerance: 1e-9, cdfOnly: true });
const cdfMs = time(() => density(m4, { x: xs, tolerance: 1e-9, cdfOnly: true }));
out("cdf of 4-term sum at 1000 arbitrary points, tol 1e-9", cdfMs, `${p4.diagnostics.terms} nodes, err est ${p4.diagnostics.error.cdf.toExponential(1)}`);

// 4. stable pdf at 1000 points: on a grid (FFT) and at arbitrary points (pointwise)
const ms = compile(stableModel);
const sgrid = { from: -10, to: 10, count: 1000 };
const ps = density(ms, { grid: sgrid, tolerance: 1e-8 });
const stableMs = time(() => density(ms, { grid: sgrid, tolerance: 1e-8 }), 15, 3);
out("stable(1.5, 0.5) pdf, 1000-pt grid, tol 1e-8", stableMs, `fft size ${ps.diagnostics.gridSize}, ${ps.diagnostics.levels} levels, err est pdf ${ps.diagnostics.error.pdf.toExponential(1)}`);
const sx = new Float64Array(1000);
for (let i = 0; i < 1000; i++) sx[i] = -10 + 20 * ((i * 0.6180339887) % 1);
const px = density(ms, { x: sx, tolerance: 1e-8 });
const stablePtsMs = time(() => density(ms, { x: sx, tolerance: 1e-8 }), 7, 1);
out("stable(1.5, 0.5) pdf, 1000 arbitrary points, tol 1e-8", stablePtsMs, `${px.diagnostics.terms} nodes at last level, ${px.diagnostics.levels} levels, err est pdf ${px.diagnostics.error.pdf.toExponential(1)}`);

// 5. convolution of two 65536-point lattices (lib/cf/lattice.ts)
const a = new Float64Array(65536);
const b = new Float64Array(65536);
for (let i = 0; i < 65536; i++) {
  a[i] = Math.exp(-i / 9000);
  b[i] = 1 / (1 + ((i - 30000) / 2000) ** 2);
}
const convOut = new Float64Array(2 * 65536 - 1);
const convMs = time(() => convolve(a, b, convOut), 21, 3);
const convN = nextPowerOfTwo(2 * 65536 - 1);
const bare2 = bareFft(convN);
out("convolution of two 65536-pt lattices", convMs);
out(`  bare fft.js transform N=${convN} (x2 transforms used)`, bare2, `ratio ${(convMs / bare2).toFixed(1)}x`);

console.log(`bench:cf (medians, minimum in brackets; load average ${(await import("node:os")).loadavg()[0].toFixed(1)} on ${(await import("node:os")).cpus().length} cores)`);
for (const [k, v] of rows) console.log(`${k.padEnd(58)} ${v}`);
