// `npm run worker`: a job worker process. Takes jobs from the BullMQ queue in Redis (SUMFOLD_REDIS_URL) and runs
// them on its own compute threads; writes usage to MariaDB (DATABASE_URL) and units to the limiter's Redis. Run
// any number of them, on any machine that reaches the same Redis and MariaDB. SIGTERM finishes the jobs in hand.
import { flushUsage } from "../lib/api/metering";
import { startCompute, stopCompute } from "../lib/compute/pool";
import { startJobWorker, workerName } from "../lib/jobs/processor";
import { ensureComputeWorker } from "./build-worker";

await ensureComputeWorker();
// the compute threads warm the engine's code paths while the worker connects
void startCompute();
const worker = startJobWorker();
await worker.waitUntilReady();
console.log(`[sumfold] job worker ${workerName()} ready`);
let stopping = false;
const stop = async (signal: string) => {
  if (stopping) return;
  stopping = true;
  await worker.close().catch(() => {});
  await stopCompute();
  await flushUsage().catch(() => {});
  console.log(`[sumfold] job worker stopped on ${signal}`);
  process.exit(0);
};
process.on("SIGTERM", () => void stop("SIGTERM"));
process.on("SIGINT", () => void stop("SIGINT"));
