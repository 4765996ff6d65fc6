// `npm start` on its own data dir and ports: the first run initialises and seeds, the second run reuses
// everything (no install, no init, no seed, no build), and a second MariaDB on the same data dir is refused. A run
// killed outright (SIGKILL: its detached MariaDB and Redis outlive it) is cleaned up by the next run, which starts.
import { spawn } from "node:child_process";
import { closeSync, mkdtempSync, openSync, readFileSync, rmSync } from "node:fs";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { REPO } from "../../scripts/lib/config";
import { startMariaDb } from "../../scripts/lib/mariadb";

const o = Number(process.env.SUMFOLD_TEST_PORT_OFFSET ?? 0);
const dir = mkdtempSync(join("/tmp", "sumfold-start-"));
const env: NodeJS.ProcessEnv = {
  ...process.env,
  NODE_ENV: "production",
  SUMFOLD_DATA_DIR: join(dir, "data"),
  SUMFOLD_ENV_FILE: join(dir, "env"),
  PORT: String(3190 + o),
  SUMFOLD_DB_PORT: String(3391 + o),
  SUMFOLD_REDIS_PORT: String(6391 + o),
  SUMFOLD_REDIS_REST_PORT: String(8091 + o),
  SUMFOLD_SMTP_PORT: String(2591 + o),
  SUMFOLD_MAILBOX_PORT: String(8191 + o),
  SUMFOLD_PAYMENTS_PORT: String(8192 + o),
};

let runs = 0;
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/**
 * Runs `npm start` until it is ready, calls `whileUp`, then stops it with SIGTERM (or kills its whole process group
 * with SIGKILL, which leaves the detached database and Redis behind) and returns its log.
 */
async function runStart(whileUp: () => Promise<void> = async () => {}, signal: "SIGTERM" | "SIGKILL" = "SIGTERM"): Promise<string> {
  // Output goes to a file, not a pipe: npm exits at once on SIGTERM while the start script is still
  // stopping its services, and a pipe would lose the rest of the log.
  const logFile = join(dir, `start-${++runs}.log`);
  const fd = openSync(logFile, "w");
  const child = spawn("npm", ["start"], { cwd: REPO, env, detached: true, stdio: ["ignore", fd, fd] });
  closeSync(fd);
  const read = () => readFileSync(logFile, "utf8");
  const end = Date.now() + 240_000;
  while (!/\[sumfold\] ready in/.test(read()) && Date.now() < end && child.exitCode === null) {
    await new Promise((r) => setTimeout(r, 200));
  }
  try {
    expect(read()).toMatch(/\[sumfold\] ready in/);
    const res = await fetch(`http://127.0.0.1:${3190 + o}/`);
    expect(res.status).toBe(200);
    await whileUp();
  } finally {
    process.kill(-child.pid!, signal);
    if (signal === "SIGKILL") {
      while (child.exitCode === null && child.signalCode === null) await new Promise((r) => setTimeout(r, 100));
      return read();
    }
    const stopBy = Date.now() + 30_000;
    while (!/\[sumfold\] stopped/.test(read()) && Date.now() < stopBy) await new Promise((r) => setTimeout(r, 100));
  }
  return read();
}

describe("npm start", () => {
  it("is idempotent: the second run reuses the data, the build and the seed", async () => {
    const first = await runStart(async () => {
      await expect(
        startMariaDb({ root: join(dir, "data", "db"), port: 3392 + o, database: "sumfold", user: "sumfold", password: "x" }, () => {}),
      ).rejects.toThrow(/already running/);
    });
    expect(first).toMatch(/initialising a private MariaDB data dir/);
    expect(first).toMatch(/seeded the demo scenario/);
    expect(first).toMatch(/\[sumfold\] stopped/);

    const second = await runStart(async () => {}, "SIGKILL");
    expect(second).not.toMatch(/initialising/);
    expect(second).not.toMatch(/seeded the demo scenario/);
    expect(second).not.toMatch(/installing/);
    expect(second).not.toMatch(/building the web app/);
    expect(second).toMatch(/demo data already present/);
    expect(second).not.toMatch(/\[sumfold\] stopped/);
    const ready = Number(/ready in ([\d.]+) s/.exec(second)![1]);
    console.log(`second npm start ready in ${ready} s`);

    // the killed run's mariadbd and redis-server are still up on the data dir; the next run stops them and starts
    const third = await runStart();
    expect(third).toMatch(/stopping MariaDB and redis-server left running by an earlier run that was killed/);
    expect(third).toMatch(/demo data already present/);
    expect(third).toMatch(/\[sumfold\] stopped/);
  }, 600_000);
});
