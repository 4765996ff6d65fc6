import "server-only";
import { sql, type SQL } from "drizzle-orm";
import { getDb } from "./client";

// Usage read models over usage_events: the day x key x endpoint table and the daily units of a month.

export interface UsageFilter {
  organizationId: number;
  /** restrict to keys created by this user (a developer's own usage) */
  createdBy?: number;
  from: Date;
  /** exclusive */
  to: Date;
  keyId?: number;
  endpoint?: string;
}

export interface UsageRow {
  day: string;
  keyId: number;
  keyLabel: string | null;
  keyPrefix: string | null;
  endpoint: string;
  requests: number;
  units: number;
  errors: number;
  medianMs: number;
}

const SORT_SQL = {
  day: sql`day`,
  key: sql`key_label`,
  endpoint: sql`endpoint`,
  requests: sql`requests`,
  units: sql`units`,
  errors: sql`errors`,
  medianMs: sql`median_ms`,
} as const;

function where(f: UsageFilter): SQL {
  const parts: SQL[] = [sql`u.organization_id = ${f.organizationId}`, sql`u.created_at >= ${f.from}`, sql`u.created_at < ${f.to}`];
  if (f.keyId) parts.push(sql`u.key_id = ${f.keyId}`);
  if (f.endpoint) parts.push(sql`u.endpoint = ${f.endpoint}`);
  if (f.createdBy !== undefined) {
    parts.push(sql`u.key_id IN (SELECT k2.id FROM api_keys k2 WHERE k2.organization_id = ${f.organizationId} AND k2.created_by = ${f.createdBy})`);
  }
  return sql.join(parts, sql` AND `);
}

const rowsOf = <T>(res: unknown) => (res as [T[]])[0];

/** Requests, units, errors (status >= 400) and median latency per UTC day, key and endpoint. */
export async function listUsageByOrg(f: UsageFilter & { sort: keyof typeof SORT_SQL; dir: "asc" | "desc"; limit: number; offset: number }) {
  const dir = f.dir === "asc" ? sql`ASC` : sql`DESC`;
  const inner = sql`SELECT DATE_FORMAT(u.created_at, '%Y-%m-%d') AS day, u.key_id, u.endpoint, u.status, u.compute_units,
      MEDIAN(u.duration_ms) OVER (PARTITION BY DATE(u.created_at), u.key_id, u.endpoint) AS med
    FROM usage_events u WHERE ${where(f)}`;
  const grouped = sql`SELECT t.day, t.key_id, k.label AS key_label, k.prefix AS key_prefix, t.endpoint,
      COUNT(*) AS requests, SUM(t.compute_units) AS units, SUM(t.status >= 400) AS errors, MAX(t.med) AS median_ms
    FROM (${inner}) t LEFT JOIN api_keys k ON k.id = t.key_id
    GROUP BY t.day, t.key_id, k.label, k.prefix, t.endpoint`;
  const db = getDb();
  const rows = rowsOf<Record<string, unknown>>(
    await db.execute(sql`${grouped} ORDER BY ${SORT_SQL[f.sort]} ${dir}, day DESC, key_id ASC, endpoint ASC LIMIT ${f.limit} OFFSET ${f.offset}`),
  );
  const [{ n, requests, units, errors }] = rowsOf<{ n: number; requests: number; units: number; errors: number }>(
    await db.execute(
      sql`SELECT COUNT(*) AS n, COALESCE(SUM(requests), 0) AS requests, COALESCE(SUM(units), 0) AS units, COALESCE(SUM(errors), 0) AS errors FROM (${grouped}) g`,
    ),
  );
  return {
    rows: rows.map(
      (r): UsageRow => ({
        day: String(r.day),
        keyId: Number(r.key_id),
        keyLabel: (r.key_label as string | null) ?? null,
        keyPrefix: (r.key_prefix as string | null) ?? null,
        endpoint: String(r.endpoint),
        requests: Number(r.requests),
        units: Number(r.units),
        errors: Number(r.errors),
        medianMs: Number(r.median_ms),
      }),
    ),
    total: Number(n),
    totals: { requests: Number(requests), units: Number(units), errors: Number(errors) },
  };
}

/** Compute units per UTC day in [from, to). */
export async function listDailyUnits(f: UsageFilter): Promise<{ day: string; units: number; requests: number }[]> {
  const rows = rowsOf<{ day: string; units: number; requests: number }>(
    await getDb().execute(
      sql`SELECT DATE_FORMAT(u.created_at, '%Y-%m-%d') AS day, SUM(u.compute_units) AS units, COUNT(*) AS requests
        FROM usage_events u WHERE ${where(f)} GROUP BY day ORDER BY day`,
    ),
  );
  return rows.map((r) => ({ day: String(r.day), units: Number(r.units), requests: Number(r.requests) }));
}

/** Units an organisation used in [from, to). */
export async function sumUnits({ organizationId, from, to }: { organizationId: number; from: Date; to: Date }): Promise<number> {
  const [r] = rowsOf<{ units: number | null }>(
    await getDb().execute(
      sql`SELECT SUM(compute_units) AS units FROM usage_events WHERE organization_id = ${organizationId} AND created_at >= ${from} AND created_at < ${to}`,
    ),
  );
  return Number(r?.units ?? 0);
}

/** Endpoints that appear in the organisation's usage (for the filter list). */
export async function listUsageEndpoints({ organizationId }: { organizationId: number }): Promise<string[]> {
  const rows = rowsOf<{ endpoint: string }>(
    await getDb().execute(sql`SELECT DISTINCT endpoint FROM usage_events WHERE organization_id = ${organizationId} ORDER BY endpoint`),
  );
  return rows.map((r) => r.endpoint);
}
