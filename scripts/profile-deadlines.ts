// npm run profile:deadlines — where the property tests' models spend their time. Draws the models of the property
// shards (tests/support/notation-arbitrary.ts, the same seeds as tests/support/property-run.ts), runs the answers'
// checks (tests/support/invariants.ts checkAnswers) on each under the same per-model deadline with the same CPU-share
// retry, and prints per shard the deadline-hit rate, per deadline stage the hits and the CPU ms the hit models used,
// and a V8 CPU profile's self time grouped by lib/cf file (the top files) — CPU time, not wall time, since the
// machine is shared. PROFILE_SHARDS=1,2 PROFILE_SCALE=0.5 (fraction of each shard's models) PROFILE_TOP=25
// PROFILE_LIST=<stage> (print the models that hit it).
import { Session } from "node:inspector";
import fc from "fast-check";
import { clearDeadline, isDeadlineExceeded, setDeadline } from "@/lib/cf/deadline";
import { isCfError } from "@/lib/cf/errors";
import type { Model } from "@/lib/cf/types";
import { checkAnswers } from "../tests/support/invariants";
import { knownDefect } from "../tests/support/known-defects";
import { aggregateArbitrary, modelArbitrary } from "../tests/support/notation-arbitrary";

const BASE_SEED = Number(process.env.SUMFOLD_PROPERTY_SEED ?? 20261203);
const DEADLINE_MS = Number(process.env.SUMFOLD_PROPERTY_DEADLINE_MS ?? 100);
const SHARDS = (process.env.PROFILE_SHARDS ?? "1,2,3,4").split(",").map(Number);
const SCALE = Number(process.env.PROFILE_SCALE ?? 1);
const TOP = Number(process.env.PROFILE_TOP ?? 25);
/** print the models that hit this deadline stage */
const LIST = process.env.PROFILE_LIST;
/** the shards' model counts (tests/cf/properties-<k>.test.ts: whole notation, aggregate claims) */
const RUNS = { whole: 450, aggregate: 200 };

const cpuMs = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};

/** the families (a severity as "each:<name>", a count law as "count:<name>") and operators in a model */
function classes(model: Model): string[] {
  const out = new Set<string>();
  const walk = (m: unknown, role: string) => {
    if (!m || typeof m !== "object") return;
    const o = m as Record<string, unknown>;
    if (typeof o.family === "string") out.add(role + o.family);
    for (const k of ["lattice", "sample", "layer", "scale", "shift", "repeat"]) if (k in o) out.add(role + k);
    if (Array.isArray(o.sum)) o.sum.forEach((t) => walk(t, ""));
    if (Array.isArray(o.mix)) (o.mix as { of: unknown }[]).forEach((t) => walk(t.of, ""));
    if (o.compound) {
      const c = o.compound as { count: unknown; each: unknown };
      walk(c.count, "count:");
      walk(c.each, "each:");
    }
    if ("of" in o) walk(o.of, role);
  };
  walk(model, "");
  return [...out];
}

type Outcome = { stage: string | null; cpu: number; refused: boolean };

/** tests/support/property-run.ts underDeadline: a model stopped before it had its CPU time runs again, stretched */
function run(model: Model): Outcome {
  let wall = DEADLINE_MS;
  const c0 = cpuMs();
  for (let attempt = 0; ; attempt++) {
    const t0 = performance.now();
    const a0 = cpuMs();
    setDeadline(Date.now() + wall);
    try {
      checkAnswers(model);
      return { stage: null, cpu: cpuMs() - c0, refused: false };
    } catch (e) {
      if (isDeadlineExceeded(e)) {
        const cpu = cpuMs() - a0;
        const elapsed = performance.now() - t0;
        if (attempt < 2 && cpu < 0.8 * DEADLINE_MS && wall < 20 * DEADLINE_MS) {
          wall = Math.min(20 * DEADLINE_MS, (wall * elapsed) / Math.max(cpu, 1));
          continue;
        }
        return { stage: e.stage, cpu: cpuMs() - c0, refused: false };
      }
      if (isCfError(e)) return { stage: null, cpu: cpuMs() - c0, refused: true };
      return { stage: `error: ${(e as Error).message.split("\n")[0].slice(0, 60)}`, cpu: cpuMs() - c0, refused: false };
    } finally {
      clearDeadline();
    }
  }
}

interface Profile {
  nodes: { id: number; callFrame: { url: string; functionName: string }; children?: number[] }[];
  samples: number[];
  timeDeltas: number[];
}

const session = new Session();
session.connect();
const post = (method: string, params?: object) =>
  new Promise<unknown>((resolve, reject) => session.post(method, params ?? {}, (err, res) => (err ? reject(err) : resolve(res))));

async function main() {
  // warm the JIT outside the counts
  for (const m of fc.sample(modelArbitrary, { seed: 1, numRuns: 20 })) if (!knownDefect(m)) run(m);
  await post("Profiler.enable");
  await post("Profiler.setSamplingInterval", { interval: 500 });
  await post("Profiler.start");
  const stages = new Map<string, { hits: number; cpu: number; classes: Map<string, number> }>();
  let total = 0;
  let totalCpu = 0;
  for (const shard of SHARDS) {
    const seed0 = BASE_SEED + 10 * (shard - 1);
    for (const [label, arb, n, seed] of [
      ["whole notation", modelArbitrary, RUNS.whole, seed0],
      ["aggregate claims", aggregateArbitrary, RUNS.aggregate, seed0 + 1],
    ] as const) {
      const models = fc.sample(arb, { seed, numRuns: Math.max(1, Math.round(n * SCALE)) });
      let hits = 0;
      let runs = 0;
      let refused = 0;
      let cpu = 0;
      for (const m of models) {
        if (knownDefect(m)) continue;
        runs++;
        const o = run(m);
        cpu += o.cpu;
        if (o.refused) refused++;
        if (o.stage) {
          hits++;
          const s = stages.get(o.stage) ?? { hits: 0, cpu: 0, classes: new Map<string, number>() };
          s.hits++;
          s.cpu += o.cpu;
          for (const k of classes(m)) s.classes.set(k, (s.classes.get(k) ?? 0) + 1);
          if (LIST === o.stage) console.log(`  [${o.stage}] ${JSON.stringify(m)}`);
          stages.set(o.stage, s);
        }
      }
      total += runs;
      totalCpu += cpu;
      console.log(`shard ${shard} ${label}: ${runs} models, ${hits} deadline hits (${((100 * hits) / runs).toFixed(1)}%), ${refused} refused, ${(cpu / 1000).toFixed(1)} s CPU`);
    }
  }
  const { profile } = (await post("Profiler.stop")) as { profile: Profile };
  console.log(`\n${total} models, ${(totalCpu / 1000).toFixed(1)} s CPU; deadline hits by stage (hits, CPU ms the hit models used):`);
  for (const [s, v] of [...stages.entries()].sort((a, b) => b[1].hits - a[1].hits))
    console.log(
      `  ${s.padEnd(28)} ${String(v.hits).padStart(5)}  ${v.cpu.toFixed(0).padStart(8)} ms   most in: ` +
        [...v.classes.entries()].sort((a, b) => b[1] - a[1]).slice(0, 6).map(([k, n]) => `${k} ${n}`).join(", "),
    );

  // self time per file (and per function within the top files)
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const self = new Map<number, number>();
  for (let i = 0; i < profile.samples.length; i++) self.set(profile.samples[i], (self.get(profile.samples[i]) ?? 0) + profile.timeDeltas[i] / 1000);
  const files = new Map<string, number>();
  const fns = new Map<string, number>();
  let sum = 0;
  for (const [id, ms] of self) {
    const f = byId.get(id)!.callFrame;
    const m = /\/(lib\/cf\/.*|tests\/.*|node_modules\/[^/]+)/.exec(f.url);
    const file = m ? m[1] : f.url ? "other" : `(${f.functionName || "native"})`;
    files.set(file, (files.get(file) ?? 0) + ms);
    const fn = `${file}:${f.functionName || "(anon)"}`;
    fns.set(fn, (fns.get(fn) ?? 0) + ms);
    sum += ms;
  }
  const table = (m: Map<string, number>, title: string) => {
    console.log(`\n${title} (sampled self time, ms and share of ${sum.toFixed(0)} ms):`);
    for (const [k, v] of [...m.entries()].sort((a, b) => b[1] - a[1]).slice(0, TOP))
      console.log(`  ${k.padEnd(64)} ${v.toFixed(0).padStart(8)}  ${((100 * v) / sum).toFixed(1).padStart(5)}%`);
  };
  // inclusive time: each sample counts once for every distinct function on its stack
  const parent = new Map<number, number>();
  for (const n of profile.nodes) for (const c of n.children ?? []) parent.set(c, n.id);
  const incl = new Map<string, number>();
  const nameOf = (id: number) => {
    const f = byId.get(id)!.callFrame;
    const m = /\/(lib\/cf\/.*)/.exec(f.url);
    return m ? `${m[1]}:${f.functionName || "(anon)"}` : null;
  };
  for (const [id, ms] of self) {
    const seen = new Set<string>();
    for (let at: number | undefined = id; at !== undefined; at = parent.get(at)) {
      const k = nameOf(at);
      if (k && !seen.has(k)) {
        seen.add(k);
        incl.set(k, (incl.get(k) ?? 0) + ms);
      }
    }
  }
  table(files, "self time by file");
  table(fns, "self time by function");
  table(incl, "inclusive time by lib/cf function");
}

main().then(
  () => session.disconnect(),
  (e) => {
    console.error(e);
    process.exit(1);
  },
);
