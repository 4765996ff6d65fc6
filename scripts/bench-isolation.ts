// `npm run bench:isolation`: figures for compute isolation and the job queue, against `next start` on private
// services (ports shifted by 2400). Prints
//   1. /api/v1/health latency p50/p99 idle and while two deadline-length computations run (Dedicated plan, 10 s),
//   2. throughput of a CPU-bound endpoint (POST /api/v1/density) with one compute thread and with two,
//   3. jobs: 100 submitted, all finished, results equal to the synchronous answers, with two worker processes.
import { spawn, type ChildProcess } from "node:child_process";
import { resolve } from "node:path";
import { REPO, testLayout, type Secrets } from "./lib/config";
import { buildIsStale, log, runBuild, startNext, startServices, startWorker, stopChild } from "./lib/stack";

process.env.SUMFOLD_TEST_PORT_OFFSET = "3700";
const root = resolve("/dev/shm", `sumfold-bench-iso-${process.pid}`);
const layout = testLayout(root);
const secrets: Secrets = { NEXTAUTH_SECRET: "bench", SUMFOLD_KEY_PEPPER: "bench-pepper", DB_PASSWORD: layout.db.password, UPSTASH_REDIS_REST_TOKEN: "bench-token", STRIPE_SECRET_KEY: "sk_test_bench", STRIPE_WEBHOOK_SECRET: "whsec_bench" };
const services = await startServices(layout, secrets);
const base = `http://127.0.0.1:${layout.appPort}`;
let server: ChildProcess | null = null;
const workers: ChildProcess[] = [];

const pct = (xs: number[], q: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))];
};
const ms = (x: number) => `${x.toFixed(1)} ms`;
const sleep = (t: number) => new Promise((r) => setTimeout(r, t));

async function post(path: string, key: string, body: unknown) {
  const r = await fetch(base + path, { method: "POST", headers: { authorization: `Bearer ${key}`, "content-type": "application/json" }, body: JSON.stringify(body) });
  return { status: r.status, body: (await r.json()) as Record<string, unknown> };
}

async function healthSample(untilMs: number): Promise<number[]> {
  const out: number[] = [];
  while (Date.now() < untilMs) {
    const t0 = performance.now();
    const r = await fetch(`${base}/api/v1/health`);
    await r.arrayBuffer();
    out.push(performance.now() - t0);
    await sleep(20);
  }
  return out;
}

try {
  const env = { ...services.env };
  if (buildIsStale()) await runBuild(env);
  const startServer = async (threads: number) => {
    await stopChild(server);
    server = await startNext(layout, { ...env, SUMFOLD_COMPUTE_THREADS: String(threads) }, process.env.BENCH_VERBOSE ? "inherit" : "ignore");
    // warm the compute threads and the key cache
    for (let i = 0; i < 4; i++) await post("/api/v1/moments", key, { model: { family: "normal", mu: 0, sigma: 1 } });
  };
  Object.assign(process.env, env);
  const { createKey } = await import("../lib/db/keys");
  const { getDb, getPool } = await import("../lib/db/client");
  const { organizations } = await import("../lib/db/schema");
  const { ALL_SCOPES } = await import("../lib/api/scopes");
  const [res] = await getDb().insert(organizations).values({ slug: `bench-${Date.now()}`, name: "Benchmark org", plan: "dedicated" });
  const { secret: key } = await createKey({ organizationId: res.insertId, createdBy: null, label: "bench", scopes: ALL_SCOPES, actor: { type: "system" } });
  await getPool().end();

  // 1. health while two deadline-length computations run
  await startServer(2);
  const idle = await healthSample(Date.now() + 3000);
  const heavy = { model: { sum: [{ family: "pareto", alpha: 3, xm: 1 }, { family: "weibull", shape: 0.5, scale: 1 }] }, p: [0.9999999999999999] };
  const t0 = Date.now();
  const running = [post("/api/v1/quantiles", key, heavy), post("/api/v1/quantiles", key, heavy)];
  await sleep(300);
  const busy = await healthSample(t0 + 9500);
  const heavyResults = await Promise.all(running);
  log(`health idle: n=${idle.length} p50 ${ms(pct(idle, 0.5))} p99 ${ms(pct(idle, 0.99))} max ${ms(Math.max(...idle))}`);
  log(`health with two 10 s computations running: n=${busy.length} p50 ${ms(pct(busy, 0.5))} p99 ${ms(pct(busy, 0.99))} max ${ms(Math.max(...busy))}`);
  log(`the two computations: ${heavyResults.map((r) => `${r.status} ${String(r.body.type ?? "").split("#")[1] ?? ""} after ${r.body.elapsedMs} ms`).join("; ")} (wall ${Date.now() - t0} ms)`);

  // 2. throughput of a CPU-bound endpoint, one compute thread vs two
  const cpu = { model: { sum: [{ family: "gamma", shape: 2, rate: 1 }, { family: "lognormal", mu: 0, sigma: 0.5 }] }, grid: { from: 0, to: 15, count: 400 } };
  const through = async (threads: number) => {
    await startServer(threads);
    const n = 24;
    let next = 0;
    const t = performance.now();
    const statuses: number[] = [];
    await Promise.all(
      Array.from({ length: 4 }, async () => {
        while (next < n) {
          next++;
          statuses.push((await post("/api/v1/density", key, cpu)).status);
        }
      }),
    );
    const secs = (performance.now() - t) / 1000;
    return { rps: n / secs, ok: statuses.filter((s) => s === 200).length, n };
  };
  const one = await through(1);
  const two = await through(2);
  log(`CPU-bound POST /api/v1/density (4 connections, ${one.n} requests): 1 thread ${one.rps.toFixed(2)} req/s (${one.ok} ok), 2 threads ${two.rps.toFixed(2)} req/s (${two.ok} ok), ratio ${(two.rps / one.rps).toFixed(2)}x`);

  // 3. jobs with two worker processes
  workers.push(await startWorker({ ...env, SUMFOLD_COMPUTE_THREADS: "1" }, "ignore"), await startWorker({ ...env, SUMFOLD_COMPUTE_THREADS: "1" }, "ignore"));
  const kinds = [
    ["quantiles", { model: { sum: [{ family: "gamma", shape: 2, rate: 1 }, { family: "normal", mu: 0, sigma: 0.6 }] }, p: [0.5, 0.9, 0.995], expectedShortfall: true }],
    ["density", { model: { family: "gamma", shape: 3, rate: 2 }, grid: { from: 0, to: 6, count: 128 } }],
    ["moments", { model: { compound: { count: { family: "poisson", lambda: 4 }, each: { family: "gamma", shape: 2, rate: 1 } } }, order: 4 }],
    ["cf", { model: { family: "normal", mu: 1, sigma: 2 }, t: { from: 0, to: 5, count: 50 } }],
    ["convolve", { terms: [{ origin: 0, step: 1, p: [0.6, 0.3, 0.1] }], power: 5 }],
  ] as const;
  const tj = performance.now();
  const ids: { id: string; op: string; body: unknown }[] = [];
  for (let i = 0; i < 100; i++) {
    const [op, body] = kinds[i % kinds.length];
    const r = await post("/api/v1/jobs", key, { operation: op, body });
    if (r.status !== 202) throw new Error(`job submission answered ${r.status}: ${JSON.stringify(r.body)}`);
    ids.push({ id: String(r.body.id), op, body });
  }
  const done = new Map<string, Record<string, unknown>>();
  while (done.size < ids.length) {
    for (const j of ids) {
      if (done.has(j.id)) continue;
      const r = await fetch(`${base}/api/v1/jobs/${j.id}`, { headers: { authorization: `Bearer ${key}` } });
      const v = (await r.json()) as Record<string, unknown>;
      if (v.status === "succeeded" || v.status === "failed") done.set(j.id, v);
    }
    await sleep(200);
  }
  const jobSecs = (performance.now() - tj) / 1000;
  const { jobsQueue } = await import("../lib/jobs/queue");
  const byWorker = new Map<string, number>();
  let equal = 0;
  let succeeded = 0;
  for (const j of ids) {
    const v = done.get(j.id)!;
    if (v.status === "succeeded") succeeded++;
    const sync = await post(`/api/v1/${j.op}`, key, j.body);
    const { meta: _m, ...syncResult } = sync.body;
    if (JSON.stringify(v.result) === JSON.stringify(syncResult)) equal++;
    const w = String(((await jobsQueue().getJob(j.id))?.returnvalue as { worker?: string } | undefined)?.worker);
    byWorker.set(w, (byWorker.get(w) ?? 0) + 1);
  }
  await jobsQueue().close();
  log(`jobs: ${ids.length} submitted, ${done.size} finished (${succeeded} succeeded) in ${jobSecs.toFixed(1)} s; ${equal} equal to the synchronous answers; per worker process: ${[...byWorker].map(([w, n]) => `${w} ${n}`).join(", ")}`);
} finally {
  for (const w of workers) await stopChild(w);
  await stopChild(server);
  await services.stop();
  spawn("rm", ["-rf", root], { cwd: REPO });
}
process.exit(0);
