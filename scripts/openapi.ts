// `npm run openapi`: writes the OpenAPI document the code generates to openapi/sumfold-v1.json.
import { writeFileSync } from "node:fs";
import { resolve } from "node:path";
import { buildOpenApiDocument } from "../lib/api/openapi";
import { stopCompute } from "../lib/compute/pool";
import { buildComputeWorker } from "./build-worker";

const file = resolve(import.meta.dirname, "../openapi/sumfold-v1.json");
await buildComputeWorker();
writeFileSync(file, JSON.stringify(await buildOpenApiDocument(), null, 2) + "\n");
await stopCompute();
console.log(`wrote ${file}`);
