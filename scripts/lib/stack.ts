import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdirSync, readdirSync, rmSync, statSync, writeFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { ensureDebianPackages } from "./apt";
import { appEnv, REPO, type Layout, type Secrets } from "./config";
import { databaseUrl, runningPid, startMariaDb, stopMariaDb, writeClientDefaults } from "./mariadb";
import { isAlive, readPid, stopPid } from "./proc";
import { applyMigrations } from "./migrate";
import { syncPlans } from "./plans";
import { redisPidFile, startRedis, stopRedis } from "./redis";
import { startRedisRest } from "../fakes/redis-rest";
import { startSmtpSink } from "../fakes/smtp-sink";
import { buildComputeWorker, COMPUTE_WORKER_FILE } from "../build-worker";
import { startPaymentsFake } from "../fakes/payments";

export const log = (m: string) => console.log(`[sumfold] ${m}`);

/** Everything one running copy needs besides the web server: database, Redis, the REST stand-in, mail. */
export interface Services {
  env: Record<string, string>;
  dbCreated: boolean;
  stop: () => Promise<void>;
}

export async function startServices(l: Layout, secrets: Secrets): Promise<Services> {
  ensureDebianPackages({ "mariadb-server": "mariadbd", "mariadb-client": "mariadb", "redis-server": "redis-server", "redis-tools": "redis-cli" }, log);
  mkdirSync(l.root, { recursive: true });
  await reclaimStale(l);
  writeFileSync(ownerFile(l), String(process.pid));
  const stops: (() => Promise<void>)[] = [];
  // All at once: a supervisor that sends SIGTERM and then SIGKILL after a grace period must not find the database
  // still waiting its turn behind the web server (a detached mariadbd would outlive the kill).
  const stop = async () => {
    const running = stops.splice(0);
    const results = await Promise.allSettled(running.map((s) => s()));
    for (const r of results) if (r.status === "rejected") log(`while stopping: ${(r.reason as Error).message}`);
    rmSync(ownerFile(l), { force: true });
  };
  try {
    const t0 = Date.now();
    const { created } = await startMariaDb(l.db, log);
    stops.push(() => stopMariaDb(l.db));
    writeClientDefaults(l.db);
    log(`MariaDB answering on 127.0.0.1:${l.db.port} (${Date.now() - t0} ms)`);
    const url = databaseUrl(l.db);
    await applyMigrations(url);
    await syncPlans(url);
    await startRedis(l.redis);
    stops.push(() => stopRedis(l.redis));
    const rest = await startRedisRest({ port: l.redisRestPort, token: secrets.UPSTASH_REDIS_REST_TOKEN, redisPort: l.redis.port });
    stops.push(() => new Promise<void>((r) => rest.close(() => r())));
    const mail = await startSmtpSink({ smtpPort: l.smtpPort, httpPort: l.mailboxPort, dir: l.mailDir });
    stops.push(mail.close);
    const payments = await startPaymentsFake({
      port: l.paymentsPort,
      secretKey: secrets.STRIPE_SECRET_KEY,
      webhookSecret: secrets.STRIPE_WEBHOOK_SECRET,
      webhookUrl: `http://127.0.0.1:${l.appPort}/api/billing/webhook`,
      stateFile: l.name === "demo" ? resolve(l.root, "payments", "state.json") : undefined,
    });
    stops.push(payments.close);
    log(`payment provider fake on ${payments.url}`);
    log(`Redis REST stand-in on 127.0.0.1:${l.redisRestPort}; SMTP sink on 127.0.0.1:${l.smtpPort}, mailbox http://127.0.0.1:${l.mailboxPort}`);
    return { env: appEnv(l, secrets, url), dbCreated: created, stop };
  } catch (e) {
    await stop();
    throw e;
  }
}

/** The pid of the command that owns a layout's services (npm start or the test run), beside their data. */
const ownerFile = (l: Layout) => join(l.root, "owner.pid");

/**
 * A previous owner that was killed outright (SIGKILL, a closed terminal) leaves its detached database and Redis
 * running on the layout's data dir. When that owner is gone, stop them so this start can take over; when it is
 * still alive, refuse with a plain message instead of fighting it for the ports.
 */
async function reclaimStale(l: Layout): Promise<void> {
  const owner = readPid(ownerFile(l));
  if (owner !== null && owner !== process.pid && isAlive(owner)) {
    throw new Error(`another Sumfold ${l.name} run (pid ${owner}) owns ${l.root}; stop it first`);
  }
  const db = runningPid(l.db);
  const redis = readPid(redisPidFile(l.redis));
  const stale = [db !== null ? "MariaDB" : null, redis !== null && isAlive(redis) ? "redis-server" : null].filter(Boolean);
  if (stale.length === 0) return;
  log(`stopping ${stale.join(" and ")} left running by an earlier run that was killed`);
  await Promise.all([db !== null ? stopMariaDb(l.db) : null, redis !== null ? stopPid(redis) : null]);
}

const BUILD_INPUTS = ["app", "lib", "public", "openapi", "next.config.ts", "tailwind.config.ts", "postcss.config.mjs", "tsconfig.json", "package-lock.json"];

function newestMtime(path: string): number {
  if (!existsSync(path)) return 0;
  const st = statSync(path);
  if (!st.isDirectory()) return st.mtimeMs;
  let newest = st.mtimeMs;
  for (const entry of readdirSync(path)) newest = Math.max(newest, newestMtime(join(path, entry)));
  return newest;
}

/** True when .next has no production build or any build input is newer than it. */
export function buildIsStale(): boolean {
  const id = resolve(REPO, process.env.SUMFOLD_NEXT_DIST ?? ".next", "BUILD_ID");
  if (!existsSync(id)) return true;
  const built = statSync(id).mtimeMs;
  if (!existsSync(COMPUTE_WORKER_FILE) || statSync(COMPUTE_WORKER_FILE).mtimeMs < newestMtime(resolve(REPO, "lib"))) return true;
  return BUILD_INPUTS.some((p) => newestMtime(resolve(REPO, p)) > built);
}

export async function runBuild(env: Record<string, string>): Promise<void> {
  log("building the compute worker and the web app (next build)...");
  await buildComputeWorker();
  return new Promise((resolveP, reject) => {
    const child = spawn(resolve(REPO, "node_modules/.bin/next"), ["build", "--webpack"], {
      cwd: REPO,
      stdio: "inherit",
      env: { ...process.env, ...env, NODE_ENV: "production" },
    });
    child.once("exit", (code) => (code === 0 ? resolveP() : reject(new Error(`next build exited with ${code}`))));
  });
}

/** Starts `next start` on 127.0.0.1 and resolves once it serves /api/v1/health. */
export async function startNext(l: Layout, env: Record<string, string>, stdio: "inherit" | "ignore" = "inherit"): Promise<ChildProcess> {
  const child = spawn(resolve(REPO, "node_modules/.bin/next"), ["start", "-H", "127.0.0.1", "-p", String(l.appPort)], {
    cwd: REPO,
    stdio: ["ignore", stdio, stdio],
    // Vitest sets NODE_ENV=test; next start needs production to read its env and serve the build.
    env: { ...process.env, ...env, NODE_ENV: "production", PORT: String(l.appPort) },
  });
  let exited = false;
  child.once("exit", () => (exited = true));
  const end = Date.now() + 60_000;
  while (Date.now() < end && !exited) {
    try {
      const r = await fetch(`http://127.0.0.1:${l.appPort}/api/v1/health`);
      if (r.status === 200 || r.status === 503) return child;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  child.kill("SIGTERM");
  throw new Error(exited ? "next start exited early" : "next start did not answer within 60 s");
}

export function stopChild(child: ChildProcess | null, graceMs = 8000): Promise<void> {
  if (!child || child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((r) => {
    const t = setTimeout(() => child.kill("SIGKILL"), graceMs);
    child.once("exit", () => {
      clearTimeout(t);
      r();
    });
    child.kill("SIGTERM");
  });
}

/** Starts one job worker process (`npm run worker`) beside the server; resolves once it takes jobs. */
export function startWorker(env: Record<string, string>, stdio: "inherit" | "ignore" = "inherit"): Promise<ChildProcess> {
  return new Promise((resolveP, reject) => {
    const child = spawn(resolve(REPO, "node_modules/.bin/tsx"), ["--conditions=react-server", "--tsconfig", "tsconfig.json", "scripts/worker.ts"], {
      cwd: REPO,
      stdio: ["ignore", "pipe", stdio],
      env: { ...process.env, ...env, NODE_ENV: "production" },
    });
    let out = "";
    const t = setTimeout(() => reject(new Error("the job worker did not start within 60 s")), 60_000);
    child.stdout!.on("data", (d) => {
      if (stdio === "inherit") process.stdout.write(d);
      out += String(d);
      if (out.includes("ready")) {
        clearTimeout(t);
        resolveP(child);
      }
    });
    child.once("exit", (code) => {
      clearTimeout(t);
      reject(new Error(`the job worker exited (${code})`));
    });
  });
}
