// Runs before `npm start` and `npm test` with nothing installed yet: plain Node, no dependencies.
// Installs node_modules with `npm ci` when they are missing or older than package-lock.json.
import { execSync } from "node:child_process";
import { existsSync, statSync } from "node:fs";

const marker = "node_modules/.package-lock.json";
const lock = "package-lock.json";
const stale = !existsSync(marker) || statSync(marker).mtimeMs < statSync(lock).mtimeMs;
if (stale) {
  console.log("[sumfold] installing node modules (npm ci)...");
  execSync("npm ci --no-audit --no-fund", { stdio: "inherit", env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" } });
}
