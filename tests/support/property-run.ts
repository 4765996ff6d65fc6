// The property tests' runner, shared by the shards tests/cf/properties-<k>.test.ts (vitest runs files in parallel, so
// thousands of models fit the suite's time): each shard draws its own models (its own fast-check seeds) from the whole
// notation, runs every model's checks (tests/support/invariants.ts) under a per-model deadline, counts deadline hits
// and refusals, and prints them by model class (families, count laws and operators present) so the slow classes can
// be found. A deadline hit is not a pass: the fraction is bounded per test (the caps sit just above what this 2-core
// machine measures; to be lowered as the slow classes get fast). A failure prints the model as JSON, the values, the
// stated bound and fast-check's seed and path.
//
// SUMFOLD_PROPERTY_SEED, SUMFOLD_PROPERTY_SCALE (multiplies every shard's model counts, e.g. 10 for a long hunt),
// SUMFOLD_PROPERTY_DEADLINE_MS and SUMFOLD_PROPERTY_MAX_DEADLINE_FRACTION (one cap for all) change the run.
import fc from "fast-check";
import { afterAll, describe, expect, it } from "vitest";
import { clearDeadline, isDeadlineExceeded, setDeadline } from "@/lib/cf/deadline";
import { isCfError } from "@/lib/cf/errors";
import type { Model } from "@/lib/cf/types";
import { checkAnswers, checkMoments, type MomentOutcome } from "./invariants";
import { knownDefect } from "./known-defects";
import { aggregateArbitrary, modelArbitrary } from "./notation-arbitrary";

const BASE_SEED = Number(process.env.SUMFOLD_PROPERTY_SEED ?? 20261203);
const SCALE = Number(process.env.SUMFOLD_PROPERTY_SCALE ?? 1);
/** per-model deadline (ms) for the whole set of checks of one model */
export const DEADLINE_MS = Number(process.env.SUMFOLD_PROPERTY_DEADLINE_MS ?? 100);
const CAP_OVERRIDE = process.env.SUMFOLD_PROPERTY_MAX_DEADLINE_FRACTION;

interface Tally {
  label: string;
  seed: number;
  runs: number;
  models: Model[];
  hits: { model: Model; stage: string }[];
  refused: { model: Model; detail: string }[];
  /** models of tests/support/known-defects.ts, not run */
  known: { model: Model; what: string }[];
  /** the model that took the most CPU time (all its attempts), with its CPU and wall ms */
  slowest: { cpu: number; wall: number; model: Model };
  /** CPU ms of the whole test */
  cpu: number;
}

const cpuMs = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};

/**
 * Runs `check` on one model under the deadline; a deadline hit or a refusal (CfError) is counted, anything else
 * throws. The deadline is wall-clock time, and the machine may be shared: a model stopped before it had
 * DEADLINE_MS of CPU time is run again with the deadline stretched by the share of CPU it got (at most 20x, twice),
 * so that the count is of models that need more than DEADLINE_MS of computing, not of a busy machine.
 */
function underDeadline<T>(tally: Tally, model: Model, check: (m: Model) => T): T | undefined {
  const known = knownDefect(model);
  if (known) {
    tally.known.push({ model, what: known.what });
    return undefined;
  }
  tally.runs++;
  tally.models.push(model);
  let wall = DEADLINE_MS;
  const start = performance.now();
  const startCpu = cpuMs();
  for (let attempt = 0; ; attempt++) {
    const t0 = performance.now();
    const c0 = cpuMs();
    setDeadline(Date.now() + wall);
    try {
      return check(model);
    } catch (e) {
      if (isDeadlineExceeded(e)) {
        const cpu = cpuMs() - c0;
        const elapsed = performance.now() - t0;
        if (attempt < 2 && cpu < 0.8 * DEADLINE_MS && wall < 20 * DEADLINE_MS) {
          wall = Math.min(20 * DEADLINE_MS, (wall * elapsed) / Math.max(cpu, 1));
          continue;
        }
        tally.hits.push({ model, stage: e.stage });
        return undefined;
      }
      if (isCfError(e) && (e.code === "not_applicable" || e.code === "limit_exceeded")) {
        tally.refused.push({ model, detail: e.message });
        return undefined;
      }
      throw e;
    } finally {
      clearDeadline();
      const cpu = cpuMs() - startCpu;
      if (cpu > tally.slowest.cpu) tally.slowest = { cpu, wall: performance.now() - start, model };
    }
  }
}

/**
 * The classes a model belongs to: every family by name (a count law inside a compound as "count:<name>", a severity as
 * "each:<name>"), every operator (sum, mix, compound, scale, shift, repeat, layer, lattice, sample) and the size of
 * its top sum or mix ("terms:4-8").
 */
export function modelClasses(model: Model): Set<string> {
  const out = new Set<string>();
  const walk = (m: unknown, role: string) => {
    if (!m || typeof m !== "object") return;
    const o = m as Record<string, unknown>;
    if (typeof o.family === "string") out.add(role + o.family);
    if ("lattice" in o) out.add(role + "lattice");
    if ("sample" in o) out.add(role + (o.weights ? "sample(weighted)" : "sample"));
    if ("sum" in o && Array.isArray(o.sum)) {
      out.add("sum");
      o.sum.forEach((t) => walk(t, ""));
    }
    if ("mix" in o && Array.isArray(o.mix)) {
      out.add("mix");
      for (const t of o.mix as { of: unknown }[]) walk(t.of, "");
    }
    if ("compound" in o) {
      out.add("compound");
      const c = o.compound as { count: unknown; each: unknown };
      walk(c.count, "count:");
      walk(c.each, "each:");
    }
    if ("layer" in o) {
      out.add(role + "layer");
      walk(o.of, role);
    }
    for (const op of ["scale", "shift", "repeat"] as const) {
      if (op in o && "of" in o) {
        out.add(op);
        walk(o.of, role);
      }
    }
  };
  walk(model, "");
  const top = model as Record<string, unknown>;
  const n = Array.isArray(top.sum) ? top.sum.length : Array.isArray(top.mix) ? top.mix.length : 1;
  out.add(n >= 4 ? "terms:4-8" : `terms:${n}`);
  return out;
}

/** Per class: models drawn, deadline hits, hit rate; the classes with the most hits first (at least 2 hits). */
function classTable(t: Tally): string[] {
  const seen = new Map<string, { n: number; hits: number }>();
  for (const m of t.models) for (const k of modelClasses(m)) seen.set(k, { n: (seen.get(k)?.n ?? 0) + 1, hits: 0 });
  for (const h of t.hits) for (const k of modelClasses(h.model)) seen.get(k)!.hits++;
  const stages = new Map<string, number>();
  for (const h of t.hits) stages.set(h.stage, (stages.get(h.stage) ?? 0) + 1);
  const rows = [...seen.entries()].filter(([, v]) => v.hits >= 2).sort((a, b) => b[1].hits - a[1].hits || b[1].hits / b[1].n - a[1].hits / a[1].n);
  return [
    `  deadline hits by class (class: hits / models with it = rate):`,
    ...rows.map(([k, v]) => `    ${k.padEnd(36)} ${String(v.hits).padStart(4)} / ${String(v.n).padEnd(4)} = ${((100 * v.hits) / v.n).toFixed(0)}%`),
    `  deadline hits by stage: ${[...stages.entries()].sort((a, b) => b[1] - a[1]).map(([s, n]) => `${s} ${n}`).join(", ")}`,
  ];
}

export interface ShardSpec {
  /** shard number, 1..; the seeds are BASE_SEED + 10 * (shard - 1) + 0, 1, 2 */
  shard: number;
  /** whole notation, aggregate claims, moments */
  runs: { whole: number; aggregate: number; moments: number };
  /** the largest fraction of models allowed past their deadline, per test */
  caps: { whole: number; aggregate: number; moments: number };
}

/** Declares one shard's three property tests and its report. */
export function propertyShard(spec: ShardSpec): void {
  const seed0 = BASE_SEED + 10 * (spec.shard - 1);
  const tallies: Tally[] = [];
  const newTally = (label: string, seed: number): Tally => {
    const t: Tally = { label, seed, runs: 0, models: [], hits: [], refused: [], known: [], slowest: { cpu: 0, wall: 0, model: { family: "normal", mu: 0, sigma: 1 } as Model }, cpu: 0 };
    tallies.push(t);
    return t;
  };
  const runs = (n: number) => Math.max(1, Math.round(n * SCALE));
  const capOf = (cap: number) => (CAP_OVERRIDE !== undefined ? Number(CAP_OVERRIDE) : cap);
  const expectFewDeadlineHits = (t: Tally, cap: number) => {
    const fraction = t.hits.length / Math.max(t.runs, 1);
    const list = t.hits.map((h) => `  [${h.stage}] ${JSON.stringify(h.model)}`).join("\n");
    expect(
      fraction,
      `${t.label}: ${t.hits.length} of ${t.runs} models passed the ${DEADLINE_MS} ms deadline (allowed fraction ${cap}; seed ${t.seed}):\n${classTable(t).join("\n")}\n${list}`,
    ).toBeLessThanOrEqual(cap);
  };

  afterAll(() => {
    for (const t of tallies) {
      const lines = [
        `${t.label}: ${t.runs} models, ${t.hits.length} deadline hits (${((100 * t.hits.length) / Math.max(t.runs, 1)).toFixed(1)}%, deadline ${DEADLINE_MS} ms), ${t.refused.length} refused, ${(t.cpu / 1000).toFixed(1)} s CPU, slowest model ${t.slowest.cpu.toFixed(0)} ms CPU (${t.slowest.wall.toFixed(0)} ms wall) (seed ${t.seed})`,
        ...classTable(t),
        ...(process.env.SUMFOLD_PROPERTY_LIST_HITS ? t.hits.map((h) => `  deadline [${h.stage}]: ${JSON.stringify(h.model)}`) : []),
        ...t.refused.map((r) => `  refused (${r.detail}): ${JSON.stringify(r.model)}`),
        ...t.known.map((k) => `  KNOWN DEFECT, not run (tests/support/known-defects.ts: ${k.what}): ${JSON.stringify(k.model)}`),
        `  slowest: ${JSON.stringify(t.slowest.model)}`,
      ];
      console.log(lines.join("\n"));
    }
  });

  const { whole, aggregate, moments } = { whole: runs(spec.runs.whole), aggregate: runs(spec.runs.aggregate), moments: runs(spec.runs.moments) };
  describe(`invariants on every answer (random models from the whole notation, shard ${spec.shard})`, () => {
    it(`${whole} models: cdf and sf in [0, 1], monotone, cdf + sf = 1, pdf >= -bound, quantiles and ES consistent with the cdf`, () => {
      const t = newTally(`shard ${spec.shard} whole notation`, seed0);
      const c0 = cpuMs();
      fc.assert(
        fc.property(modelArbitrary, (m) => {
          underDeadline(t, m, checkAnswers);
        }),
        { numRuns: whole, seed: seed0, endOnFailure: true },
      );
      t.cpu = cpuMs() - c0;
      expectFewDeadlineHits(t, capOf(spec.caps.whole));
    }, 900_000);

    it(`${aggregate} aggregate-claims models: compounds alone, scaled, shifted, summed with other claims and mixed`, () => {
      const t = newTally(`shard ${spec.shard} aggregate claims`, seed0 + 1);
      const c0 = cpuMs();
      fc.assert(
        fc.property(aggregateArbitrary, (m) => {
          underDeadline(t, m, checkAnswers);
        }),
        { numRuns: aggregate, seed: seed0 + 1, endOnFailure: true },
      );
      t.cpu = cpuMs() - c0;
      expectFewDeadlineHits(t, capOf(spec.caps.aggregate));
    }, 900_000);

    it(`${moments} models: the exact mean and second moment equal the numerical moments of the computed distribution`, () => {
      const t = newTally(`shard ${spec.shard} moments`, seed0 + 2);
      const c0 = cpuMs();
      const outcomes: Record<MomentOutcome, number> = { checked: 0, heavy: 0, "not-applicable": 0 };
      fc.assert(
        fc.property(fc.oneof(modelArbitrary, aggregateArbitrary), (m) => {
          const o = underDeadline(t, m, checkMoments);
          if (o) outcomes[o]++;
        }),
        { numRuns: moments, seed: seed0 + 2, endOnFailure: true },
      );
      t.cpu = cpuMs() - c0;
      console.log(`shard ${spec.shard} moments: ${JSON.stringify(outcomes)}`);
      // the check must have bitten on a real share of the models (those with four moments and tails the grid holds)
      expect(outcomes.checked, `moments checked on ${outcomes.checked} of ${moments} models`).toBeGreaterThanOrEqual(moments / 10);
      expectFewDeadlineHits(t, capOf(spec.caps.moments));
    }, 900_000);
  });
}
