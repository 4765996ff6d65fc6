// `npm run openapi`: writes the OpenAPI document the code generates to openapi/sumfold-v1.json.
import { writeFileSync } from "node:fs";
import { resolve } from "node:path";
import { buildOpenApiDocument } from "../lib/api/openapi";

const file = resolve(import.meta.dirname, "../openapi/sumfold-v1.json");
writeFileSync(file, JSON.stringify(buildOpenApiDocument(), null, 2) + "\n");
console.log(`wrote ${file}`);
