// Builds build/compute-worker.cjs from the current lib/ before any test file runs.
import { buildComputeWorker } from "../../scripts/build-worker";

export default async function setup() {
  await buildComputeWorker();
}
