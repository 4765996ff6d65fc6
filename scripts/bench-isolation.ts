// `npm run bench:isolation`: figures for compute isolation and the job queue, against `next start` on private
// services (ports shifted by 2400). Prints
//   1. /api/v1/health latency p50/p99 idle and while two deadline-length computations run (Dedicated plan, 10 s),
//      beside OPTIONS latency (the request thread alone), the load average and the compute threads' nice values,
//   2. throughput of a CPU-bound endpoint (POST /api/v1/quantiles, 1000 levels) with one compute thread and with two,
//   3. jobs: 100 submitted, all finished, results equal to the synchronous answers, with two worker processes.
import { spawn, type ChildProcess } from "node:child_process";
import { readdirSync, readFileSync } from "node:fs";
import { availableParallelism, loadavg } from "node:os";
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

/** CPU ms (user + system) of one thread from /proc/<pid>/task/<tid>/stat (fields 14, 15; clock ticks of 10 ms). */
function threadCpuMs(pid: number, tid: number): number {
  const stat = readFileSync(`/proc/${pid}/task/${tid}/stat`, "utf8");
  const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
  return (Number(f[11]) + Number(f[12])) * 10;
}

/** CPU ms of a process's main thread and of all its threads, and how many threads it has. */
function cpuTimes(pid: number): { main: number; total: number; threads: number } {
  const tids = readdirSync(`/proc/${pid}/task`).map(Number);
  let total = 0;
  for (const tid of tids) {
    try {
      total += threadCpuMs(pid, tid);
    } catch {
      /* the thread ended */
    }
  }
  return { main: threadCpuMs(pid, pid), total, threads: tids.length };
}

/** The process serving HTTP: `next start` itself or the child it forks (the descendant with the most threads). */
function serverPid(child: ChildProcess): number {
  const all = readdirSync("/proc").filter((d) => /^\d+$/.test(d)).map(Number);
  const parent = new Map<number, number>();
  for (const p of all) {
    try {
      const st = readFileSync(`/proc/${p}/stat`, "utf8");
      parent.set(p, Number(st.slice(st.lastIndexOf(")") + 2).split(" ")[1]));
    } catch {
      /* gone */
    }
  }
  const family = [child.pid!];
  for (let i = 0; i < family.length; i++) for (const [p, pp] of parent) if (pp === family[i]) family.push(p);
  const threads = (p: number) => {
    try {
      return readdirSync(`/proc/${p}/task`).length;
    } catch {
      return 0;
    }
  };
  return family.sort((a, b) => threads(b) - threads(a))[0];
}

/**
 * Samples, alternately, GET /api/v1/health (the main thread plus one database round trip) and OPTIONS on a keyed
 * path (the main thread alone: no database, no Redis), so a slow health answer can be told apart: a slow OPTIONS
 * too means the main thread was held; a fast one means the wait was the database's.
 */
async function healthSample(untilMs: number): Promise<{ health: number[]; options: number[] }> {
  const health: number[] = [];
  const options: number[] = [];
  while (Date.now() < untilMs) {
    let t0 = performance.now();
    await (await fetch(`${base}/api/v1/health`)).arrayBuffer();
    health.push(performance.now() - t0);
    await sleep(10);
    t0 = performance.now();
    await (await fetch(`${base}/api/v1/quantiles`, { method: "OPTIONS" })).arrayBuffer();
    options.push(performance.now() - t0);
    await sleep(10);
  }
  return { health, options };
}

const figures = (xs: number[]) => `n=${xs.length} p50 ${ms(pct(xs, 0.5))} p99 ${ms(pct(xs, 0.99))} max ${ms(Math.max(...xs))}`;

/** The nice value of each of a process's threads (field 19 of /proc/<pid>/task/<tid>/stat), main thread first. */
function threadNice(pid: number): number[] {
  return readdirSync(`/proc/${pid}/task`)
    .map(Number)
    .sort((a, b) => (a === pid ? -1 : b === pid ? 1 : a - b))
    .map((tid) => {
      const st = readFileSync(`/proc/${pid}/task/${tid}/stat`, "utf8");
      return Number(st.slice(st.lastIndexOf(")") + 2).split(" ")[16]);
    });
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
  const nice = threadNice(serverPid(server!));
  const heavyResults = await Promise.all(running);
  log(`load average ${loadavg().map((x) => x.toFixed(2)).join(" ")} on ${availableParallelism()} cores; server threads' nice values: main ${nice[0]}, others ${[...new Set(nice.slice(1))].join("/")}`);
  log(`health idle: ${figures(idle.health)}; OPTIONS (main thread only) ${figures(idle.options)}`);
  log(`health with two 10 s computations running: ${figures(busy.health)}; OPTIONS (main thread only) ${figures(busy.options)}`);
  log(`the two computations: ${heavyResults.map((r) => `${r.status} ${String(r.body.type ?? "").split("#")[1] ?? ""} after ${r.body.elapsedMs} ms`).join("; ")} (wall ${Date.now() - t0} ms)`);

  // 2. throughput of a CPU-bound endpoint, one compute thread vs two. Each request computes for a few hundred ms
  // (so the main thread's share per request, parsing, the key check, metering and the response, is small against
  // it); rounds alternate 1, 2, 2, 1 threads so a change in the machine's other load biases neither side. Printed
  // beside the rate: the engine time per request (meta.computeMs), the wait for a thread (elapsed - compute), and
  // the CPU time the server's main thread and the whole server process used per request (from /proc), which show
  // whether the main thread or the machine (other processes, the load generator) is what limits the second thread.
  const cpu = {
    model: { sum: [{ family: "gamma", shape: 2, rate: 1 }, { family: "lognormal", mu: 0, sigma: 0.5 }, { family: "weibull", shape: 1.5, scale: 1 }] },
    p: Array.from({ length: 1000 }, (_, i) => (i + 0.5) / 1000),
    expectedShortfall: true,
    tolerance: 1e-12,
  };
  const through = async (threads: number) => {
    await startServer(threads);
    const pid = serverPid(server!);
    const n = 24;
    let next = 0;
    const statuses: number[] = [];
    const computeMs: number[] = [];
    const waitMs: number[] = [];
    const cpu0 = cpuTimes(pid);
    const self0 = process.cpuUsage();
    const t = performance.now();
    await Promise.all(
      Array.from({ length: 4 }, async () => {
        while (next < n) {
          next++;
          const t1 = performance.now();
          const r = await post("/api/v1/quantiles", key, cpu);
          statuses.push(r.status);
          const meta = r.body.meta as { computeMs?: number } | undefined;
          if (meta?.computeMs !== undefined) {
            computeMs.push(meta.computeMs);
            waitMs.push(performance.now() - t1 - meta.computeMs);
          }
        }
      }),
    );
    const secs = (performance.now() - t) / 1000;
    const cpu1 = cpuTimes(pid);
    const self = process.cpuUsage(self0);
    const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / Math.max(1, xs.length);
    return {
      threads,
      rps: n / secs,
      ok: statuses.filter((s) => s === 200).length,
      n,
      computeMs: mean(computeMs),
      waitMs: mean(waitMs),
      mainCpuMs: (cpu1.main - cpu0.main) / n,
      processCpuMs: (cpu1.total - cpu0.total) / n,
      loadGenCpuMs: (self.user + self.system) / 1000 / n,
      cores: (cpu1.total - cpu0.total) / 1000 / secs,
    };
  };
  const rounds = [await through(1), await through(2), await through(2), await through(1)];
  for (const r of rounds) {
    log(
      `  ${r.threads} thread${r.threads > 1 ? "s" : ""}: ${r.rps.toFixed(2)} req/s (${r.ok}/${r.n} ok); per request: engine ${ms(r.computeMs)}, wait for a thread ${ms(r.waitMs)}, ` +
        `server main-thread CPU ${ms(r.mainCpuMs)}, server process CPU ${ms(r.processCpuMs)} (${r.cores.toFixed(2)} cores busy), load generator CPU ${ms(r.loadGenCpuMs)}`,
    );
  }
  const rate = (k: number) => {
    const rs = rounds.filter((r) => r.threads === k);
    return rs.reduce((a, r) => a + r.n, 0) / rs.reduce((a, r) => a + r.n / r.rps, 0);
  };
  // With the kernel's autogroup scheduling on, busy cores are shared between sessions, not threads: while other
  // sessions keep the cores busy, this server's session gets its share whatever its thread count, and a second
  // compute thread cannot raise it ("cores busy" above stays flat). The ratio means something on a quiet machine.
  let autogroup = "unknown";
  try {
    autogroup = readFileSync("/proc/sys/kernel/sched_autogroup_enabled", "utf8").trim() === "1" ? "on" : "off";
  } catch {
    /* not Linux */
  }
  log(`kernel autogroup scheduling: ${autogroup}`);
  log(`CPU-bound POST /api/v1/quantiles (1000 levels with shortfall, 4 connections, 2 x 24 requests each): 1 thread ${rate(1).toFixed(2)} req/s, 2 threads ${rate(2).toFixed(2)} req/s, ratio ${(rate(2) / rate(1)).toFixed(2)}x; load average ${loadavg().map((x) => x.toFixed(2)).join(" ")} on ${availableParallelism()} cores`);

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
