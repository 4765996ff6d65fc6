// `npm test`: the whole suite. Starts a private MariaDB (on /dev/shm when it exists), Redis, the Redis REST
// stand-in, the SMTP sink and `next start` on test ports; type-checks; runs vitest in two phases (the second
// one stops and restarts services, so it runs alone); stops everything at the end, also on failure.
// Extra arguments go to vitest: `npm test -- tests/cf`.
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdirSync, rmSync } from "node:fs";
import { resolve } from "node:path";
import { ensureDebianPackages } from "./lib/apt";
import { REPO, testLayout, type Secrets } from "./lib/config";
import { buildIsStale, log, runBuild, startNext, startServices, startWorker, stopChild, type Services } from "./lib/stack";

const args = process.argv.slice(2);
const shm = existsSync("/dev/shm") ? "/dev/shm" : resolve(REPO, ".data");
const root = resolve(shm, `sumfold-test-${process.pid}`);
const layout = testLayout(root);
const secrets: Secrets = {
  NEXTAUTH_SECRET: "test-nextauth-secret-not-for-production",
  SUMFOLD_KEY_PEPPER: "test-key-pepper-not-for-production",
  DB_PASSWORD: layout.db.password,
  UPSTASH_REDIS_REST_TOKEN: "test-redis-rest-token",
  STRIPE_SECRET_KEY: "sk_test_local_fake_only",
  STRIPE_WEBHOOK_SECRET: "whsec_test_local_fake_only",
};

let services: Services | null = null;
let next: ChildProcess | null = null;
let worker: ChildProcess | null = null;
let current: ChildProcess | null = null;
let cleaned = false;

async function cleanup() {
  if (cleaned) return;
  cleaned = true;
  await Promise.all([stopChild(current), stopChild(next), stopChild(worker)]);
  await services?.stop();
  rmSync(root, { recursive: true, force: true });
}

for (const sig of ["SIGINT", "SIGTERM"] as const) {
  process.on(sig, () => {
    void cleanup().then(() => process.exit(130));
  });
}

function run(cmd: string, argv: string[], env: Record<string, string>): Promise<number> {
  return new Promise((resolveP) => {
    current = spawn(cmd, argv, { cwd: REPO, stdio: "inherit", env: { ...process.env, ...env } });
    current.once("exit", (code, signal) => resolveP(code ?? (signal ? 1 : 0)));
  });
}

let code = 1;
const t0 = Date.now();
try {
  ensureDebianPackages({ chromium: "chromium" }, log);
  mkdirSync(root, { recursive: true });
  services = await startServices(layout, secrets);
  const env: Record<string, string> = {
    ...services.env,
    SUMFOLD_TEST_LAYOUT: JSON.stringify(layout),
    SUMFOLD_TEST_BASE_URL: `http://127.0.0.1:${layout.appPort}`,
    // compute threads keep the default priority here: on a machine shared with other work a lowered one would
    // stretch computations past the short plan deadlines some tests rely on (the benchmark runs with the default)
    SUMFOLD_COMPUTE_NICE: "0",
  };
  const bin = (name: string) => resolve(REPO, "node_modules/.bin", name);
  log("type-checking (tsc --noEmit)...");
  code = await run(bin("tsc"), ["--noEmit", "-p", "."], env);
  if (code === 0) {
    // SUMFOLD_TEST_NO_SERVER=1 skips the build and `next start` for quick runs of tests that need neither.
    if (process.env.SUMFOLD_TEST_NO_SERVER !== "1") {
      if (buildIsStale()) await runBuild(services.env);
      next = await startNext(layout, services.env, "ignore");
      // the explorer's heavy runs go to the job queue: one worker beside the server, as `npm start` runs
      worker = await startWorker(services.env, "ignore");
    }
    const vitest = bin("vitest");
    const selected = args.length > 0 ? args : [];
    code = await run(vitest, ["run", "--exclude", "tests/disruptive/**", ...(selected.length ? ["--passWithNoTests"] : []), ...selected], env);
    const wantsDisruptive = args.length === 0 || args.some((a) => a.includes("disruptive"));
    if (code === 0 && wantsDisruptive) {
      log("disruptive phase: tests that stop and restart services, one file at a time");
      const picked = args.filter((a) => a.includes("disruptive"));
      code = await run(vitest, ["run", "--no-file-parallelism", ...(picked.length ? picked : ["tests/disruptive/"])], env);
    }
  }
} catch (e) {
  console.error(`[sumfold] test run failed: ${(e as Error).message}`);
  code = 1;
} finally {
  await cleanup();
}
log(`test run finished in ${((Date.now() - t0) / 1000).toFixed(0)} s with exit code ${code}`);
process.exit(code);
