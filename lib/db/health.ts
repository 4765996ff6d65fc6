import "server-only";
import { getPool } from "./client";

/** Pings the database with a bounded wait; never throws. */
export async function checkDatabase(timeoutMs = 1500): Promise<{ reachable: boolean; latencyMs: number; error?: string }> {
  const t0 = performance.now();
  try {
    await Promise.race([
      getPool().query("SELECT 1"),
      new Promise((_, reject) => setTimeout(() => reject(new Error(`no answer within ${timeoutMs} ms`)), timeoutMs)),
    ]);
    return { reachable: true, latencyMs: Math.round(performance.now() - t0) };
  } catch (e) {
    return { reachable: false, latencyMs: Math.round(performance.now() - t0), error: (e as Error).message };
  }
}
