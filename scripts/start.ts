// `npm start`: installs what is missing, starts the private services, migrates and seeds the demo data,
// builds when stale, and serves the product on http://127.0.0.1:$PORT (default 3000). Ctrl-C stops it all.
import type { ChildProcess } from "node:child_process";
import { demoLayout, loadOrCreateSecrets } from "./lib/config";
import { seedDemo } from "./lib/seed";
import { buildIsStale, log, runBuild, startNext, startServices, startWorker, stopChild, type Services } from "./lib/stack";

const t0 = Date.now();
const secrets = loadOrCreateSecrets();
const layout = demoLayout(secrets);
let services: Services | null = null;
let next: ChildProcess | null = null;
let worker: ChildProcess | null = null;
let stopping = false;

async function shutdown(code: number) {
  if (stopping) return;
  stopping = true;
  log("stopping...");
  // Two phases, each all at once: the web server and the worker first (they flush usage to the database and Redis
  // on SIGTERM), then the services together, so a supervisor's SIGKILL after its grace finds nothing waiting its turn.
  await Promise.all([stopChild(next), stopChild(worker)]);
  await services?.stop();
  log("stopped");
  process.exit(code);
}
process.on("SIGINT", () => void shutdown(0));
process.on("SIGTERM", () => void shutdown(0));

try {
  services = await startServices(layout, secrets);
  const inserted = await seedDemo(services.env.DATABASE_URL, services.env);
  log(inserted > 0 ? `seeded the demo scenario (${inserted} rows)` : "demo data already present");
  if (buildIsStale()) await runBuild(services.env);
  if (stopping) process.exit(0);
  next = await startNext(layout, services.env);
  next.once("exit", (code) => {
    if (!stopping) {
      log(`next start exited (${code}); stopping services`);
      void shutdown(code ?? 1);
    }
  });
  // One job worker beside the server; more can run anywhere with `npm run worker` against the same Redis and MariaDB.
  worker = await startWorker(services.env);
  log(`ready in ${((Date.now() - t0) / 1000).toFixed(1)} s: http://127.0.0.1:${layout.appPort}  (mailbox: ${services.env.SUMFOLD_MAILBOX_URL})`);
} catch (e) {
  console.error(`[sumfold] start failed: ${(e as Error).message}`);
  await shutdown(1);
}
