// `npm run bench:http`: bounded load on 127.0.0.1 against `next start` on private services (as the tests
// start them): small keyed POST /api/v1/cf calls (key check, rate limit and metering on) and, in the same run,
// an unkeyed echo route as the framework's own ceiling. Prints req/s, p50 and p99 for both at 8 and 32
// connections, their ratios, and checks that usage rows equal the keyed 2xx responses counted by autocannon.
// `-- --instances 2` runs two server instances on one database and Redis, alternating requests between them.
import { spawn, type ChildProcess } from "node:child_process";
import { rmSync } from "node:fs";
import { resolve } from "node:path";
import { parseArgs } from "node:util";
import autocannon from "autocannon";
import mysql from "mysql2/promise";
import { REPO, testLayout, type Secrets } from "./lib/config";
import { buildIsStale, log, runBuild, startNext, startServices, stopChild } from "./lib/stack";

const { values } = parseArgs({ options: { instances: { type: "string", default: "1" }, seconds: { type: "string", default: "10" } } });
const instances = Math.max(1, Math.min(2, Number(values.instances)));
const seconds = Number(values.seconds);
process.env.SUMFOLD_TEST_PORT_OFFSET = "2000";
const root = resolve("/dev/shm", `sumfold-bench-${process.pid}`);
const layout = testLayout(root);
const secrets: Secrets = { NEXTAUTH_SECRET: "bench", SUMFOLD_KEY_PEPPER: "bench-pepper", DB_PASSWORD: layout.db.password, UPSTASH_REDIS_REST_TOKEN: "bench-token" };
const services = await startServices(layout, secrets);
const servers: ChildProcess[] = [];
try {
  const env = { ...services.env, SUMFOLD_BENCH: "1" };
  if (buildIsStale()) await runBuild(env);
  for (let i = 0; i < instances; i++) servers.push(await startNext({ ...layout, appPort: layout.appPort + i }, env, "ignore"));
  Object.assign(process.env, env);
  const { createKey } = await import("../lib/db/keys");
  const { getDb, getPool } = await import("../lib/db/client");
  const { organizations } = await import("../lib/db/schema");
  const [res] = await getDb().insert(organizations).values({ slug: `bench-${Date.now()}`, name: "Benchmark org", plan: "dedicated" });
  const { secret } = await createKey({ organizationId: res.insertId, createdBy: null, label: "bench", scopes: ["cf"], actor: { type: "system" } });
  await getPool().end();

  const body = JSON.stringify({ model: { sum: [{ family: "normal", mu: 0, sigma: 1 }, { family: "gamma", shape: 2, rate: 1 }] }, t: [0.1, 0.5, 1, 2] });
  const urls = servers.map((_, i) => `http://127.0.0.1:${layout.appPort + i}`);
  const run = (path: string, connections: number, headers: Record<string, string>) =>
    new Promise<autocannon.Result>((done, fail) => {
      const requests = urls.map((u) => ({ method: "POST" as const, path, headers, body, setupRequest: (r: object) => ({ ...r, url: u }) }));
      autocannon(
        { url: urls[0], connections, duration: seconds, method: "POST", headers: { "content-type": "application/json", ...headers }, body, requests: instances > 1 ? (requests as never) : undefined },
        (err, result) => (err ? fail(err) : done(result)),
      );
    });
  let keyed2xx = 0;
  console.log(`\n${instances} instance(s), ${seconds} s per run, load tool on the same 2-core machine\n`);
  console.log("connections  route          req/s    p50 ms  p99 ms");
  for (const c of [8, 32]) {
    await run("/api/bench/echo", 4, {}); // warm-up
    const plain = await run("/api/bench/echo", c, {});
    const keyed = await run("/api/v1/cf", c, { authorization: `Bearer ${secret}`, "content-type": "application/json" });
    keyed2xx += keyed["2xx"];
    const row = (name: string, r: autocannon.Result) =>
      console.log(`${String(c).padStart(11)}  ${name.padEnd(13)} ${r.requests.average.toFixed(0).padStart(6)}  ${String(r.latency.p50).padStart(7)} ${String(r.latency.p99).padStart(7)}`);
    row("echo (bare)", plain);
    row("cf (keyed)", keyed);
    console.log(
      `             ratio: throughput ${(keyed.requests.average / plain.requests.average).toFixed(2)} (target >= 0.70), p99 ${(keyed.latency.p99 / Math.max(1, plain.latency.p99)).toFixed(2)} (target <= 1.5); non-2xx keyed: ${keyed.non2xx}`,
    );
  }
  // Let the servers flush their metering (every 500 ms), then count.
  await new Promise((r) => setTimeout(r, 2000));
  const conn = await mysql.createConnection({ uri: services.env.DATABASE_URL });
  const [rows] = await conn.query("SELECT COUNT(*) AS n FROM usage_events WHERE endpoint='POST /api/v1/cf' AND status=200");
  await conn.end();
  const counted = Number((rows as { n: number }[])[0].n);
  console.log(`\nusage rows for keyed 200s: ${counted}; keyed 2xx counted by the load tool: ${keyed2xx}; lost: ${keyed2xx - counted}`);
} finally {
  for (const s of servers) await stopChild(s);
  await services.stop();
  rmSync(root, { recursive: true, force: true });
  log("benchmark services stopped");
}
