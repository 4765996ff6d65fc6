// SIGTERM while a computation runs: the server stops the work at once (no waiting for the deadline), answers
// the request 503, writes its usage row, and exits.
import { spawn } from "node:child_process";
import { and, eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { getDb } from "@/lib/db/client";
import { usageEvents } from "@/lib/db/schema";
import { REPO } from "../../scripts/lib/config";
import { orgWithKey } from "../support/api";
import { testLayout } from "../support/layout";

describe("SIGTERM", () => {
  it("stops in-flight computations, answers them 503 and still flushes their usage", async () => {
    const port = testLayout().appPort + 57;
    const child = spawn(`${REPO}/node_modules/.bin/next`, ["start", "-H", "127.0.0.1", "-p", String(port)], {
      cwd: REPO,
      env: { ...process.env, NODE_ENV: "production", PORT: String(port), NEXT_MANUAL_SIG_HANDLE: "true" },
      stdio: "ignore",
    });
    const exited = new Promise<number | null>((r) => child.once("exit", (code) => r(code)));
    for (let i = 0; i < 300; i++) {
      const ok = await fetch(`http://127.0.0.1:${port}/api/v1/health`).then((r) => r.status === 200, () => false);
      if (ok) break;
      await new Promise((r) => setTimeout(r, 200));
    }
    // a 10 s deadline: the stop must not wait for it; 32 levels from 1 - 2^-53 down keep it busy far past that
    const o = await orgWithKey({ plan: "dedicated" });
    const pending = fetch(`http://127.0.0.1:${port}/api/v1/quantiles`, {
      method: "POST",
      headers: { authorization: `Bearer ${o.secret}`, "content-type": "application/json" },
      body: JSON.stringify({ model: { sum: [{ family: "pareto", alpha: 3, xm: 1 }, { family: "weibull", shape: 0.5, scale: 1 }] }, p: Array.from({ length: 32 }, (_, k) => 1 - (k + 1) * 2 ** -53) }),
    }).then(
      async (r) => ({ status: r.status, body: await r.json().catch(() => null) }),
      () => ({ status: 0, body: null }),
    );
    await new Promise((r) => setTimeout(r, 1500));
    const t0 = performance.now();
    child.kill("SIGTERM");
    const res = await pending;
    const code = await exited;
    console.log(`[sigterm] in-flight request answered ${res.status}; server exited with ${code} ${Math.round(performance.now() - t0)} ms after SIGTERM`);
    expect(res.status).toBe(503);
    expect(code).toBe(0);
    const rows = await getDb().select().from(usageEvents).where(and(eq(usageEvents.organizationId, o.organizationId), eq(usageEvents.endpoint, "POST /api/v1/quantiles")));
    expect(rows).toHaveLength(1);
    expect(rows[0].status).toBe(503);
  }, 120_000);
});
