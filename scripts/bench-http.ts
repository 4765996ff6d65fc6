// `npm run bench:http`: bounded load on 127.0.0.1 against `next start` on private services (as the tests
// start them): small keyed POST /api/v1/cf calls (key check, rate limit and metering on) and, in the same run,
// an unkeyed echo route as the framework's own ceiling. Prints req/s, p50 and p99 for both at 8 and 32
// connections, their ratios, and checks that usage rows equal the keyed 2xx responses counted by autocannon.
// `-- --instances 2` runs two server instances on one database and Redis, with one load process per instance;
// `-- --requests N` sets the requests per run (default 3000).
import { spawn, type ChildProcess } from "node:child_process";
import { rmSync } from "node:fs";
import { resolve } from "node:path";
import { parseArgs } from "node:util";
import type autocannon from "autocannon";
import mysql from "mysql2/promise";
import { REPO, testLayout, type Secrets } from "./lib/config";
import { buildIsStale, log, runBuild, startNext, startServices, stopChild } from "./lib/stack";

const { values } = parseArgs({ options: { instances: { type: "string", default: "1" }, requests: { type: "string", default: "3000" } } });
const instances = Math.max(1, Math.min(2, Number(values.instances)));
const amount = Number(values.requests);
process.env.SUMFOLD_TEST_PORT_OFFSET = "2000";
const root = resolve("/dev/shm", `sumfold-bench-${process.pid}`);
const layout = testLayout(root);
const secrets: Secrets = { NEXTAUTH_SECRET: "bench", SUMFOLD_KEY_PEPPER: "bench-pepper", DB_PASSWORD: layout.db.password, UPSTASH_REDIS_REST_TOKEN: "bench-token", STRIPE_SECRET_KEY: "sk_test_bench", STRIPE_WEBHOOK_SECRET: "whsec_bench" };
const services = await startServices(layout, secrets);
const servers: ChildProcess[] = [];
try {
  const env = { ...services.env, SUMFOLD_BENCH: "1" };
  if (buildIsStale()) await runBuild(env);
  for (let i = 0; i < instances; i++) servers.push(await startNext({ ...layout, appPort: layout.appPort + i }, env, process.env.BENCH_VERBOSE ? "inherit" : "ignore"));
  Object.assign(process.env, env);
  const { createKey } = await import("../lib/db/keys");
  const { getDb, getPool } = await import("../lib/db/client");
  const { organizations } = await import("../lib/db/schema");
  const [res] = await getDb().insert(organizations).values({ slug: `bench-${Date.now()}`, name: "Benchmark org", plan: "dedicated" });
  const { secret } = await createKey({ organizationId: res.insertId, createdBy: null, label: "bench", scopes: ["cf"], actor: { type: "system" } });
  await getPool().end();

  const body = JSON.stringify({ model: { sum: [{ family: "normal", mu: 0, sigma: 1 }, { family: "gamma", shape: 2, rate: 1 }] }, t: [0.1, 0.5, 1, 2] });
  const urls = servers.map((_, i) => `http://127.0.0.1:${layout.appPort + i}`);
  // The load tool runs in its own process, so it does not share an event loop with the local Redis REST
  // stand-in that lives in this one. A fixed number of requests per run makes the row count exact.
  interface Run { rps: number; p50: number; p99: number; ok: number; non2xx: number }
  const one = (url: string, connections: number, n: number, headers: Record<string, string>) =>
    new Promise<autocannon.Result>((done, fail) => {
      const args = ["-c", String(connections), "-a", String(n), "-m", "POST", "-H", "content-type=application/json", "-b", body, "-j"];
      for (const [k, v] of Object.entries(headers)) args.push("-H", `${k}=${v}`);
      const child = spawn(resolve(REPO, "node_modules/.bin/autocannon"), [...args, url], { stdio: ["ignore", "pipe", "ignore"] });
      let out = "";
      child.stdout.on("data", (d) => (out += d));
      child.once("exit", (code) => (code === 0 ? done(JSON.parse(out) as autocannon.Result) : fail(new Error(`autocannon exited ${code}`))));
    });
  // With two instances, one load process per instance, each with half the connections and requests.
  const run = async (path: string, connections: number, headers: Record<string, string>): Promise<Run> => {
    const rs = await Promise.all(urls.map((u) => one(u + path, Math.max(1, connections / urls.length), Math.round(amount / urls.length), headers)));
    return {
      rps: rs.reduce((a, r) => a + r.requests.average, 0),
      p50: Math.max(...rs.map((r) => r.latency.p50)),
      p99: Math.max(...rs.map((r) => r.latency.p99)),
      ok: rs.reduce((a, r) => a + r["2xx"], 0),
      non2xx: rs.reduce((a, r) => a + r.non2xx, 0),
    };
  };
  let keyed2xx = 0;
  console.log(`\n${instances} instance(s), ${amount} requests per run, load tool on the same 2-core machine\n`);
  console.log("connections  route          req/s    p50 ms  p99 ms");
  await run("/api/bench/echo", 4, {}); // warm-up
  keyed2xx += (await run("/api/v1/cf", 4, { authorization: `Bearer ${secret}` })).ok;
  for (const c of [8, 32]) {

    const plain = await run("/api/bench/echo", c, {});
    const keyed = await run("/api/v1/cf", c, { authorization: `Bearer ${secret}`, "content-type": "application/json" });
    keyed2xx += keyed.ok;
    const row = (name: string, r: Run) => console.log(`${String(c).padStart(11)}  ${name.padEnd(13)} ${r.rps.toFixed(0).padStart(6)}  ${String(r.p50).padStart(7)} ${String(r.p99).padStart(7)}`);
    row("echo (bare)", plain);
    row("cf (keyed)", keyed);
    console.log(
      `             ratio: throughput ${(keyed.rps / plain.rps).toFixed(2)} (target >= 0.70), p99 ${(keyed.p99 / Math.max(1, plain.p99)).toFixed(2)} (target <= 1.5); non-2xx keyed: ${keyed.non2xx}`,
    );
  }
  // Let the servers flush their metering (every 500 ms), then count.
  await new Promise((r) => setTimeout(r, 2000));
  const conn = await mysql.createConnection({ uri: services.env.DATABASE_URL });
  const [rows] = await conn.query("SELECT COUNT(*) AS n FROM usage_events WHERE endpoint='POST /api/v1/cf' AND status=200");
  const [all] = await conn.query("SELECT endpoint, status, COUNT(*) AS n FROM usage_events GROUP BY endpoint, status");
  if (process.env.BENCH_VERBOSE) console.log(all);
  await conn.end();
  const counted = Number((rows as { n: number }[])[0].n);
  console.log(`\nusage rows for keyed 200s: ${counted}; keyed 2xx counted by the load tool: ${keyed2xx}; lost: ${keyed2xx - counted}`);
} finally {
  for (const s of servers) await stopChild(s);
  await services.stop();
  rmSync(root, { recursive: true, force: true });
  log("benchmark services stopped");
}
