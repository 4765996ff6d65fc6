// Bundles the compute worker thread (lib/compute/task.ts and the engine it runs) into build/compute-worker.cjs,
// a plain Node file that piscina loads in every worker thread, outside the Next.js bundle. Run by `npm run build`,
// the start and test commands and `npm run worker`; `tsx scripts/build-worker.ts` runs it alone.
import { build } from "esbuild";
import { existsSync, statSync } from "node:fs";
import { resolve } from "node:path";
import { pathToFileURL } from "node:url";

const REPO = resolve(import.meta.dirname, "..");
export const COMPUTE_WORKER_FILE = resolve(REPO, "build/compute-worker.cjs");

export async function buildComputeWorker(out = COMPUTE_WORKER_FILE): Promise<string> {
  await build({
    entryPoints: [resolve(REPO, "lib/compute/task.ts")],
    outfile: out,
    bundle: true,
    platform: "node",
    format: "cjs",
    target: "node20",
    conditions: ["react-server"],
    tsconfig: resolve(REPO, "tsconfig.json"),
    sourcemap: "inline",
    logLevel: "warning",
  });
  return out;
}

/** Builds the worker when it is missing or older than `newerThan` (ms epoch). */
export async function ensureComputeWorker(newerThan = 0): Promise<string> {
  if (!existsSync(COMPUTE_WORKER_FILE) || statSync(COMPUTE_WORKER_FILE).mtimeMs < newerThan) await buildComputeWorker();
  return COMPUTE_WORKER_FILE;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  const t0 = Date.now();
  const f = await buildComputeWorker();
  console.log(`[sumfold] built ${f} (${Date.now() - t0} ms)`);
}
