// Benchmark: CF of a large (weighted) sample, cost per (value x point); prints medians.
import { compile } from "../lib/cf/index";

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function time(f: () => void, reps: number): number {
  f();
  const ts: number[] = [];
  for (let r = 0; r < reps; r++) {
    const t0 = performance.now();
    f();
    ts.push(performance.now() - t0);
  }
  return median(ts);
}

// demo data: claim sizes of an invented fleet insurer, irregular values with exposure weights
// mulberry32 generator (public-domain 32-bit PRNG)
let seed = 12345;
const rnd = () => {
  seed = (seed + 0x6d2b79f5) | 0;
  let x = Math.imul(seed ^ (seed >>> 15), 1 | seed);
  x = (x + Math.imul(x ^ (x >>> 7), 61 | x)) ^ x;
  return ((x ^ (x >>> 14)) >>> 0) / 4294967296;
};
for (const n of [4096, 65536, 1_000_000]) {
  const sample = Array.from({ length: n }, () => Math.exp(1 + 0.8 * (rnd() + rnd() + rnd() - 1.5)) + rnd() * 1e-3);
  const weights = sample.map(() => 0.5 + rnd());
  const model = compile({ sample, weights });
  const m = n >= 1_000_000 ? 256 : n >= 65536 ? 1024 : 4096;
  const tu = Float64Array.from({ length: m }, (_, k) => k * 0.01);
  const tr = Float64Array.from({ length: m }, () => rnd() * 40).sort();
  const re = new Float64Array(m);
  const im = new Float64Array(m);
  const reps = n * m > 1e8 ? 3 : 7;
  const a = time(() => model.cf(tu, re, im), reps);
  const b = time(() => model.cf(tr, re, im), reps);
  console.log(
      `kind ${model.kind.type}: ` +
    `sample n=${n}, ${m} points: uniform t ${a.toFixed(1)} ms (${((a * 1e6) / (n * m)).toFixed(2)} ns per value x point); ` +
      `arbitrary t ${b.toFixed(1)} ms (${((b * 1e6) / (n * m)).toFixed(2)} ns per value x point)`,
  );
}
