// No 500 from any body the fuzzer can make: seeded fast-check bodies (arbitrary JSON, and model-shaped bodies drawn
// from the whole notation with extreme, wrong-typed and missing values, nested near and past the limits) against
// every keyed POST endpoint, with keys on the plan with the shortest deadline. Every answer must be below 500; an
// error must be application/problem+json with a `type`; a success must carry only finite numbers (RFC 8259 JSON has
// no NaN or Infinity, so a non-finite float would arrive as null or fail to parse).
// SUMFOLD_FUZZ_SEED and SUMFOLD_FUZZ_RUNS replay or widen a run; a failure prints the endpoint and the body.
import fc from "fast-check";
import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as jobs from "@/app/api/v1/jobs/route";
import * as job from "@/app/api/v1/jobs/[id]/route";
import { FAMILY_NAMES, FAMILY_SPECS } from "@/lib/cf/families/spec";
import { MAX_DEPTH } from "@/lib/cf/limits";
import { MAX_JSON_DEPTH } from "@/lib/api/walk";
import { jobsQueue } from "@/lib/jobs/queue";
import { apiServer, orgWithKey } from "../support/api";
import { routeServer, type RouteModule } from "../support/route-server";

const SEED = Number(process.env.SUMFOLD_FUZZ_SEED ?? 20261203);
const RUNS = Number(process.env.SUMFOLD_FUZZ_RUNS ?? 1);
const LANES = 6;
// the free plan: a 1 s deadline, 5 requests per second and one computation at a time per key
const PLAN = "free";
const MIN_GAP_MS = 220;

const sync = apiServer();
const queued = routeServer({ "/api/v1/jobs": jobs as RouteModule, "/api/v1/jobs/[id]": job as RouteModule });
afterAll(async () => {
  await new Promise<void>((r) => queued.close(() => r()));
  await jobsQueue().close();
});

// ---------------------------------------------------------------------------------------------------- numbers
/** Extreme doubles: the ends of the range, subnormals, signed zeros, integers past 2^53, near-integers. */
const EXTREMES = [0, -0, 1, -1, 0.5, 2, 1e-300, -1e-300, 5e-324, -5e-324, 2.2250738585072014e-308, 1e-16, 1 - 2 ** -53, 1 + 2 ** -52, 1e16, 9007199254740993, 1e100, 1e300, 1e308, -1e308, 1.7976931348623157e308, -1.7976931348623157e308, 1e6, 1e6 + 1, 2 ** 20, 2 ** 31, -(2 ** 31), 255, 256, 257];
const extreme = fc.constantFrom(...EXTREMES);
const finiteDouble = fc.double({ noNaN: true, noDefaultInfinity: true });
const smallNum = fc.double({ min: -20, max: 20, noNaN: true });
const anyNumber = fc.oneof({ weight: 3, arbitrary: extreme }, { weight: 2, arbitrary: finiteDouble }, { weight: 3, arbitrary: smallNum }, { weight: 1, arbitrary: fc.integer({ min: -5, max: 2000 }) });
const wrongTypeAny = fc.oneof(fc.constant(null), fc.boolean(), fc.constant("1"), fc.string({ maxLength: 4 }), fc.constant([]), fc.constant({}), fc.constant([1]));
/** A value for a numeric field: mostly numbers (extreme or ordinary), sometimes the wrong type. */
const numberishAny = fc.oneof({ weight: 8, arbitrary: anyNumber }, { weight: 1, arbitrary: wrongTypeAny });
const prob: fc.Arbitrary<unknown> = fc.oneof({ weight: 4, arbitrary: fc.double({ min: 0, max: 1, noNaN: true }) }, { weight: 2, arbitrary: fc.constantFrom(0, 1, 5e-324, 1e-300, 1 - 2 ** -53, 0.9999999999999999, 1e-16, 0.5) }, { weight: 1, arbitrary: numberishAny });

/** A short list of numbers, rarely a long one (a long list is valid input and must be handled within the deadline). */
const numList = (item: fc.Arbitrary<unknown>) =>
  fc.oneof({ weight: 9, arbitrary: fc.array(item, { minLength: 0, maxLength: 6 }) }, { weight: 1, arbitrary: fc.array(item, { minLength: 100, maxLength: 2000 }) });

// ---------------------------------------------------------------------------------------------------- models
/**
 * The generators, hostile (wrong types, out-of-range values, missing fields: mostly refused) or not (values within
 * their documented ranges, extremes included, fields left out only where optional: mostly computed).
 */
function generators(hostile: boolean) {
  /** the hostile arbitrary, or the in-range one */
  const h = <A, B>(bad: fc.Arbitrary<A>, good: fc.Arbitrary<B>): fc.Arbitrary<A | B> => (hostile ? fc.oneof(bad, good) : good);
  const numberish = h(numberishAny, fc.oneof({ weight: 3, arbitrary: smallNum }, { weight: 1, arbitrary: extreme }));
  const positive = fc.oneof(fc.double({ min: 1e-3, max: 1e3, noNaN: true }), fc.constantFrom(5e-324, 1e-300, 1e-16, 1e16, 1e300, 1e308));
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  const keys = (required: string[]): { requiredKeys: any[] } => ({ requiredKeys: hostile ? [] : required });
  const level = h(prob, fc.oneof({ weight: 4, arbitrary: fc.double({ min: 1e-6, max: 1 - 1e-6, noNaN: true }) }, { weight: 1, arbitrary: fc.constantFrom(5e-324, 1e-300, 1e-16, 0.5, 1 - 2 ** -53, 0.9999999999999999) }));

  /** A parameter value inside its documented range (often at an edge), or (hostile) anywhere. */
  function paramValue(lo: number, hi: number, int: boolean): fc.Arbitrary<unknown> {
    const a = Number.isFinite(lo) ? lo : -1e3;
    const b = Number.isFinite(hi) ? hi : Math.max(a + 10, 10);
    const inside = int ? fc.integer({ min: Math.ceil(Math.max(a, -1e6)), max: Math.floor(Math.min(b, 1e6)) }) : fc.double({ min: a, max: b, noNaN: true, noDefaultInfinity: true });
    const edges = [lo, hi, lo + 1e-12, hi - 1e-12, lo * (1 + 1e-15) || 5e-324, hi * (1 - 1e-15), ...(hi === Infinity ? [1e300, 1e308] : [])].filter(Number.isFinite);
    return fc.oneof({ weight: 6, arbitrary: inside }, { weight: 2, arbitrary: edges.length ? fc.constantFrom(...edges) : inside }, { weight: hostile ? 2 : 0, arbitrary: numberishAny });
  }

  const familyNode = fc.constantFrom(...FAMILY_NAMES).chain((name) => {
    const spec = FAMILY_SPECS[name];
    const fields: Record<string, fc.Arbitrary<unknown>> = {};
    for (const p of spec.params) fields[p.name] = p.values ? h(wrongTypeAny, fc.constantFrom(...p.values)) : paramValue(p.lo, p.hi, p.type === "int");
    const required = spec.params.filter((p) => p.default === undefined && !p.optional).map((p) => p.name);
    return fc
      .record({ family: h(fc.constantFrom("Normal", "", "pareto ", "nope"), fc.constant(name as string)), ...fields }, keys(["family", ...required]))
      .map((m) => (hostile ? m : { ...m, family: name }));
  });

  const counting = FAMILY_NAMES.filter((n) => (FAMILY_SPECS[n] as { count?: boolean }).count);
  const countNode = fc.constantFrom(...counting).chain((name) => {
    const fields: Record<string, fc.Arbitrary<unknown>> = {};
    for (const p of FAMILY_SPECS[name].params) if (!p.values) fields[p.name] = paramValue(p.lo, p.hi, p.type === "int");
    return fc.record(fields).map((m) => ({ family: name, ...m }));
  });

  /** Lattice probabilities: a proper law (normalised), or (hostile) an improper one or anything. */
  const properP = fc.oneof(
    fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 1, maxLength: 8 }).map((p) => {
      const s = p.reduce((x, y) => x + y, 0);
      return s > 0 ? p.map((v) => v / s) : [1];
    }),
    fc.constant([1]),
  );
  const latticeP = h(fc.oneof(fc.constant([1e308, 1e308]), numList(prob)), properP);
  const step = h(extreme, fc.oneof(fc.constantFrom(1, 0.5, 0.01), positive));
  const latticeNode = fc.record({ lattice: fc.record({ origin: numberish, step, p: latticeP }, keys(["origin", "step", "p"])) });
  const sampleNode = h(
    fc.record({ sample: numList(numberish), weights: numList(fc.oneof(fc.double({ min: 0, max: 10, noNaN: true }), extreme)) }, { requiredKeys: [] }),
    fc.array(numberish, { minLength: 1, maxLength: 8 }).map((sample) => ({ sample })),
  );
  const datasetNode = fc.record(
    { dataset: h(fc.oneof(fc.string({ maxLength: 20 }), fc.constant(7)), fc.stringMatching(/^ds_[0-9a-hjkmnp-tv-z]{16}$/)), version: h(extreme, fc.integer({ min: 1, max: 3 })) },
    keys(["dataset"]),
  );

  const { model } = fc.letrec<{ model: unknown; node: unknown }>((tie) => ({
    model: fc.oneof(
      { depthSize: "small", withCrossShrink: true },
      { weight: 6, arbitrary: familyNode },
      { weight: 1, arbitrary: latticeNode },
      { weight: 1, arbitrary: sampleNode },
      { weight: 1, arbitrary: datasetNode },
      { weight: 4, arbitrary: tie("node") },
    ),
    node: fc.oneof(
      fc.record({ sum: fc.array(tie("model"), { minLength: hostile ? 0 : 1, maxLength: 4 }) }),
      fc.array(tie("model"), { minLength: 1, maxLength: 3 }).chain((of) =>
        h(fc.array(fc.oneof(prob, extreme), { minLength: of.length, maxLength: of.length }), fc.constant(of.map(() => 1 / of.length))).map((w) => ({
          mix: of.map((m, i) => ({ weight: w[i], of: m })),
        })),
      ),
      fc.record({ scale: h(numberishAny, fc.oneof(smallNum, extreme).filter((v) => v !== 0)), of: tie("model") }),
      fc.record({ shift: numberish, of: tie("model") }),
      fc.record({ repeat: h(extreme, fc.oneof(fc.integer({ min: 1, max: 50 }), fc.constantFrom(1e6, 2 ** 19))), of: tie("model") }),
      fc.record({ compound: fc.record({ count: h(tie("model"), countNode), each: tie("model") }, keys(["count", "each"])) }),
      fc.record({
        layer: h(
          fc.record({ deductible: numberishAny, limit: numberishAny, share: numberishAny }, { requiredKeys: [] }),
          fc.record({ deductible: fc.oneof(fc.constant(0), positive), limit: positive, share: fc.oneof(fc.double({ min: 1e-3, max: 1, noNaN: true }), fc.constantFrom(1, 5e-324)) }, { requiredKeys: [] }),
        ),
        of: tie("model"),
      }),
    ),
  }));

  /** Nesting at the engine's depth limit and at the body-shape limit, each a step under, at and past it. */
  const deepModel = fc.constantFrom(MAX_DEPTH - 1, MAX_DEPTH, MAX_DEPTH + 1, MAX_JSON_DEPTH - 2, MAX_JSON_DEPTH, MAX_JSON_DEPTH + 1).chain((depth) =>
    fc.constantFrom("scale", "sum", "shift").map((how) => {
      let m: unknown = { family: "normal", mu: 0, sigma: 1 };
      for (let i = 0; i < depth; i++) m = how === "sum" ? { sum: [m] } : how === "scale" ? { scale: 1, of: m } : { shift: 0, of: m };
      return m;
    }),
  );
  const anyModel = fc.oneof({ weight: 20, arbitrary: model }, { weight: 1, arbitrary: deepModel }, { weight: hostile ? 1 : 0, arbitrary: wrongTypeAny });

  // ---------------------------------------------------------------------------------------------------- bodies
  const gridAny = fc.record({ from: numberishAny, to: numberishAny, count: fc.oneof(fc.integer({ min: -1, max: 600 }), fc.constantFrom(2, 2 ** 20, 2 ** 20 + 1, 1e308, 0.5), wrongTypeAny) }, { requiredKeys: [] });
  const gridOrdered = fc
    .tuple(fc.oneof(smallNum, extreme), fc.oneof(smallNum, extreme), fc.oneof({ weight: 20, arbitrary: fc.integer({ min: 2, max: 400 }) }, { weight: 1, arbitrary: fc.constantFrom(2 ** 16, 2 ** 20) }))
    .map(([a, b, count]) => ({ from: Math.min(a, b), to: a === b ? a + 1 : Math.max(a, b), count }));
  const grid = h(gridAny, gridOrdered);
  const points = h(numList(numberish), fc.array(fc.oneof(smallNum, extreme), { minLength: 1, maxLength: 6 }));
  const tolerance = h(fc.oneof(fc.constantFrom(1e-15, 0.11, 0, -1, 1e308, 5e-324), numberishAny), fc.constantFrom(1e-14, 0.1, 1e-10, 1e-6, 1e-3));
  const levels = h(numList(prob), fc.array(level, { minLength: 1, maxLength: 5 }));
  const list = (item: fc.Arbitrary<unknown>) => h(numList(item), fc.array(item, { minLength: 1, maxLength: 4 }));

  const BODIES: Record<string, fc.Arbitrary<unknown>> = {
    cf: fc.record({ model: anyModel, t: fc.oneof(points, grid) }, keys(["model", "t"])),
    density: fc.record(
      {
        model: anyModel,
        x: points,
        grid,
        method: h(wrongTypeAny, fc.constantFrom("auto", "fft", "gil-pelaez", "discretise")),
        tolerance,
        range: fc.record({ from: numberish, to: numberish }, keys(["from", "to"])),
        maxFrequency: h(numberishAny, positive),
      },
      keys(["model"]),
    ),
    quantiles: fc.record(
      { model: anyModel, p: levels, expectedShortfall: h(wrongTypeAny, fc.boolean()), tail: h(fc.constant("middle"), fc.constantFrom("upper", "lower")), tolerance, method: h(fc.constant("fft"), fc.constantFrom("auto", "discretise")) },
      keys(["model", "p"]),
    ),
    moments: fc.record({ model: anyModel, order: h(numberishAny, fc.integer({ min: 1, max: 12 })) }, keys(["model"])),
    convolve: fc.record(
      {
        terms: fc.array(fc.record({ origin: numberish, step, p: h(numList(fc.oneof(prob, extreme)), properP) }, keys(["origin", "step", "p"])), { minLength: hostile ? 0 : 1, maxLength: 4 }),
        power: h(numberishAny, fc.oneof(fc.integer({ min: 1, max: 40 }), fc.constantFrom(1e3, 1e6))),
      },
      keys(["terms"]),
    ),
    risk: fc.record(
      {
        model: anyModel,
        var: fc.record({ p: levels, tail: fc.constantFrom("upper", "lower") }, keys(["p"])),
        es: fc.record({ p: levels, tail: fc.constantFrom("upper", "lower") }, keys(["p"])),
        stopLoss: list(numberish),
        limitedMean: list(numberish),
        layerMean: fc.array(h(fc.record({ deductible: numberishAny, limit: numberishAny }, { requiredKeys: [] }), fc.record({ deductible: numberish, limit: positive })), { minLength: 1, maxLength: 3 }),
        exceedance: list(numberish),
        returnPeriod: list(h(numberishAny, fc.oneof(fc.constantFrom(1 + 2 ** -52, 2, 200, 1e16, 1e308), fc.double({ min: 1.001, max: 1e4, noNaN: true })))),
        outside: h(
          fc.record({ lsl: numberishAny, usl: numberishAny }, { requiredKeys: [] }),
          fc.tuple(fc.oneof(smallNum, extreme), fc.oneof(smallNum, extreme)).filter(([a, b]) => a !== b).map(([a, b]) => ({ lsl: Math.min(a, b), usl: Math.max(a, b) })),
        ),
        tolerance,
        method: h(wrongTypeAny, fc.constantFrom("auto", "discretise")),
      },
      keys(["model"]),
    ),
  };
  const ops = Object.keys(BODIES);
  BODIES.jobs = h(
    fc.record({ operation: fc.oneof(fc.string({ maxLength: 8 }), wrongTypeAny), body: fc.jsonValue({ maxDepth: 3 }) }, { requiredKeys: [] }),
    fc.constantFrom(...ops).chain((operation) => BODIES[operation].map((body) => ({ operation, body }))),
  );
  return BODIES;
}

/** A case: an endpoint and the raw text sent (arbitrary JSON, a model-shaped body, or text nested past the limits). */
interface Case {
  endpoint: string;
  text: string;
}
const HOSTILE = generators(true);
const SANE = generators(false);
const endpoints = Object.keys(SANE);
const arbitraryJson = fc.tuple(fc.constantFrom(...endpoints), fc.jsonValue({ maxDepth: 6 })).map(([endpoint, v]) => ({ endpoint, text: JSON.stringify(v) }));
const shaped = (bodies: Record<string, fc.Arbitrary<unknown>>) => fc.constantFrom(...endpoints).chain((endpoint) => bodies[endpoint].map((v) => ({ endpoint, text: JSON.stringify(v) })));
/** Text nested near and far past the limits (built as text: too deep for JSON.stringify's own recursion). */
const deepText = fc
  .tuple(fc.constantFrom(...endpoints), fc.constantFrom(MAX_JSON_DEPTH - 1, MAX_JSON_DEPTH, MAX_JSON_DEPTH + 1, 5000, 100_000), fc.constantFrom("array", "object", "model"))
  .map(([endpoint, n, how]) => ({
    endpoint,
    text:
      how === "array"
        ? "[".repeat(n) + "]".repeat(n)
        : how === "object"
          ? '{"a":'.repeat(n) + "1" + "}".repeat(n)
          : '{"model":' + '{"scale":2,"of":'.repeat(n) + '{"family":"normal","mu":0,"sigma":1}' + "}".repeat(n + 1),
  }));

// ---------------------------------------------------------------------------------------------------- checks
/** Every problem with one response, as text (empty when it is fine). */
function verdict(status: number, type: string | undefined, text: string): string[] {
  const out: string[] = [];
  if (status >= 500) out.push(`status ${status}`);
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch {
    out.push("the body is not JSON");
    return out;
  }
  if (status >= 400) {
    if (!/^application\/problem\+json/.test(type ?? "")) out.push(`content-type ${type} on an error`);
    if (!body || typeof body !== "object" || typeof (body as { type?: unknown }).type !== "string") out.push("a problem without a type");
  } else {
    // a JSON null stands for "does not exist" (e.g. a moment) only in the fields documented so; any other
    // non-number in a number's place is caught by the schema tests. Here: no Infinity/NaN can hide in a 2xx.
    const stack: { v: unknown; at: string }[] = [{ v: body, at: "" }];
    while (stack.length) {
      const { v, at } = stack.pop()!;
      if (typeof v === "number" && !Number.isFinite(v)) out.push(`non-finite number at ${at}`);
      else if (v && typeof v === "object") for (const [k, x] of Object.entries(v)) stack.push({ v: x, at: `${at}/${k}` });
    }
    if (/(^|[^a-z"])(NaN|-?Infinity)([^a-z"]|$)/.test(text.replace(/"(?:[^"\\]|\\.)*"/g, '""'))) out.push("NaN or Infinity in the JSON text");
  }
  return out;
}

interface Failure {
  endpoint: string;
  status: number;
  problems: string[];
  request: string;
  response: string;
}

const cut = (s: string, n = 1500) => (s.length > n ? `${s.slice(0, n)}... (${s.length} chars)` : s);

async function send(secret: string, c: Case): Promise<{ status: number; type?: string; text: string }> {
  const server = c.endpoint === "jobs" ? queued : sync;
  const res = await supertest(server)
    .post(`/api/v1/${c.endpoint}`)
    .set("authorization", `Bearer ${secret}`)
    .set("content-type", "application/json")
    .buffer(true)
    .parse((r, done) => {
      let s = "";
      r.setEncoding("utf8");
      r.on("data", (d: string) => (s += d));
      r.on("end", () => done(null, s));
    })
    .send(c.text);
  return { status: res.status, type: res.headers["content-type"], text: res.body as string };
}

/** Runs the cases on LANES keys in parallel, each lane paced under the plan's request rate. */
async function runAll(cases: Case[], secrets: string[]): Promise<{ failures: Failure[]; statuses: Map<number, number>; jobIds: string[] }> {
  const failures: Failure[] = [];
  const statuses = new Map<number, number>();
  const jobIds: string[] = [];
  let next = 0;
  await Promise.all(
    secrets.map(async (secret) => {
      for (;;) {
        const i = next++;
        if (i >= cases.length) return;
        const c = cases[i];
        const t0 = Date.now();
        const r = await send(secret, c);
        statuses.set(r.status, (statuses.get(r.status) ?? 0) + 1);
        const problems = verdict(r.status, r.type, r.text);
        if (problems.length) failures.push({ endpoint: c.endpoint, status: r.status, problems, request: cut(c.text), response: cut(r.text, 800) });
        if (c.endpoint === "jobs" && r.status === 202) jobIds.push(JSON.parse(r.text).id);
        const wait = MIN_GAP_MS - (Date.now() - t0);
        if (wait > 0) await new Promise((ok) => setTimeout(ok, wait));
      }
    }),
  );
  return { failures, statuses, jobIds };
}

const report = (fs: Failure[]) =>
  fs.map((f, i) => `#${i + 1} POST /api/v1/${f.endpoint} -> ${f.status}: ${f.problems.join("; ")}\n  request:  ${f.request}\n  response: ${f.response}`).join("\n");

// ---------------------------------------------------------------------------------------------------- tests
let secrets: string[] = [];
beforeAll(async () => {
  secrets = await Promise.all(Array.from({ length: LANES }, () => orgWithKey({ plan: PLAN }).then((o) => o.secret)));
});

describe(`fuzzer (seed ${SEED})`, () => {
  it(
    "no body the fuzzer makes (arbitrary JSON, model-shaped, nested past the limits) answers 500, an untyped problem or a non-finite number",
    async () => {
      const cases: Case[] = [
        ...fc.sample(arbitraryJson, { seed: SEED, numRuns: 60 * RUNS }),
        ...fc.sample(deepText, { seed: SEED + 1, numRuns: 16 * RUNS }),
        ...fc.sample(shaped(HOSTILE), { seed: SEED + 2, numRuns: 150 * RUNS }),
        ...fc.sample(shaped(SANE), { seed: SEED + 3, numRuns: 250 * RUNS }),
      ];
      const { failures, statuses, jobIds } = await runAll(cases, secrets);
      // the jobs that were accepted: none may have failed with an internal error; results must be finite
      const q = jobsQueue();
      await new Promise((r) => setTimeout(r, 1500));
      for (const id of jobIds) {
        const j = await q.getJob(id);
        if (!j) continue;
        const state = await j.getState();
        if (state === "completed") {
          const o = j.returnvalue as { ok: boolean; result?: unknown; problem?: { status?: number } } | null;
          const out = JSON.stringify(o?.ok ? o.result : (o?.problem ?? null));
          const problems = o?.ok ? verdict(200, "application/json", out) : verdict(Number(o?.problem?.status ?? 500), "application/problem+json", out);
          if (problems.length) failures.push({ endpoint: `jobs/${id}`, status: 200, problems, request: cut(JSON.stringify(j.data?.body ?? null)), response: cut(out, 800) });
        } else if (state === "failed") {
          failures.push({ endpoint: `jobs/${id}`, status: 500, problems: [`job failed: ${j.failedReason}`], request: cut(JSON.stringify(j.data?.body ?? null)), response: "" });
        } else {
          // still waiting: the fuzzer's jobs must not hold the shared worker for the rest of the suite
          await j.remove().catch(() => {});
        }
      }
      const summary = [...statuses.entries()].sort((a, b) => a[0] - b[0]).map(([s, n]) => `${s}: ${n}`).join(", ");
      console.log(`[fuzz] seed ${SEED}: ${cases.length} requests (${summary}), ${jobIds.length} jobs accepted`);
      expect(failures.length, `${failures.length} failing responses (seed ${SEED}):\n${report(failures)}`).toBe(0);
      // the generators reach past validation: a share of the bodies is computed, not only refused
      expect(statuses.get(200) ?? 0).toBeGreaterThan(20);
    },
    170_000,
  );
});
