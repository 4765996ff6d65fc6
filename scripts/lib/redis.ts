import { spawnSync } from "node:child_process";
import { mkdirSync } from "node:fs";
import { join } from "node:path";
import { isAlive, readPid, spawnService, stopPid, waitFor } from "./proc";

/** A private redis-server on 127.0.0.1 with its own port, dir and pid file; nothing is persisted. */
export interface RedisConfig {
  root: string;
  port: number;
}

export const redisPidFile = (c: RedisConfig) => join(c.root, "redis.pid");
const pidFile = redisPidFile;

export function redisPing(c: RedisConfig): boolean {
  const r = spawnSync("redis-cli", ["-h", "127.0.0.1", "-p", String(c.port), "ping"], { encoding: "utf8" });
  return r.status === 0 && r.stdout.trim() === "PONG";
}

export async function startRedis(c: RedisConfig): Promise<number> {
  mkdirSync(c.root, { recursive: true });
  const old = readPid(pidFile(c));
  if (old !== null && isAlive(old)) throw new Error(`redis-server (pid ${old}) is already running in ${c.root}`);
  const child = spawnService(
    "redis-server",
    [
      "--port", String(c.port),
      "--bind", "127.0.0.1",
      "--dir", c.root,
      "--pidfile", pidFile(c),
      "--save", "",
      "--appendonly", "no",
      "--daemonize", "no",
      "--protected-mode", "yes",
    ],
    join(c.root, "redis.log"),
    { detached: true },
  );
  child.unref();
  let exited = false;
  child.once("exit", () => (exited = true));
  await waitFor(() => exited || redisPing(c), 20_000, "redis-server to answer");
  if (exited) throw new Error(`redis-server did not start; see ${join(c.root, "redis.log")}`);
  return child.pid!;
}

export async function stopRedis(c: RedisConfig): Promise<void> {
  const pid = readPid(pidFile(c));
  if (pid !== null) await stopPid(pid);
}
