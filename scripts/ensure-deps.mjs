// Runs before `npm start` and `npm test` with nothing installed yet: plain Node, no dependencies.
// Installs node_modules with `npm ci` when they are missing or were installed from another package-lock.json. The lock
// is identified by its content (SHA-256 stamp written after a successful install), not by file times: a checkout or a
// second worktree sharing node_modules touches the lock's mtime without changing what it pins.
import { execSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, lstatSync, readFileSync, statSync, writeFileSync } from "node:fs";

const lock = "package-lock.json";
const marker = "node_modules/.package-lock.json"; // written by npm itself on every install
const stamp = "node_modules/.sumfold-lock-sha256";
const want = createHash("sha256").update(readFileSync(lock)).digest("hex");
const have = existsSync(stamp) ? readFileSync(stamp, "utf8").trim() : null;
// a tree installed before stamps existed: npm's own marker newer than the lock means it was installed from this lock
const legacy = have === null && existsSync(marker) && statSync(marker).mtimeMs >= statSync(lock).mtimeMs;
if (have !== want && !legacy) {
  if (existsSync("node_modules") && lstatSync("node_modules").isSymbolicLink()) {
    // npm ci would empty the linked tree (shared with another checkout) and then replace the link: refuse instead
    console.error("[sumfold] node_modules is a link to a tree installed from another package-lock.json; run `npm ci` where it points");
    process.exit(1);
  }
  console.log("[sumfold] installing node modules (npm ci)...");
  execSync("npm ci --no-audit --no-fund", { stdio: "inherit", env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" } });
}
if (have !== want) writeFileSync(stamp, want + "\n");
