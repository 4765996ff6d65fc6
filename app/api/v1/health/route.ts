// GET /api/v1/health: liveness and database reachability; no key required.
import { checkDatabase } from "@/lib/db/health";
import { ENGINE_VERSION } from "@/lib/version";

export const dynamic = "force-dynamic";

export async function GET() {
  const db = await checkDatabase();
  const ok = db.reachable;
  return Response.json(
    {
      status: ok ? "ok" : "degraded",
      database: ok ? "reachable" : "unreachable",
      databaseLatencyMs: db.latencyMs,
      engineVersion: ENGINE_VERSION,
      time: new Date().toISOString(),
    },
    { status: ok ? 200 : 503, headers: { "cache-control": "no-store" } },
  );
}
