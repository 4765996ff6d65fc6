import "server-only";
import { planOf } from "@/lib/api/plans";
import { can } from "@/lib/auth/roles";
import { PortalError } from "./http";
import type { Caller } from "@/lib/auth/session";
import { listKeysByOrg } from "@/lib/db/keys";
import { listDailyUnits, listUsageByOrg, listUsageEndpoints, sumUnits, type UsageRow } from "@/lib/db/portal-usage";
import { forbidden } from "./http";
import type { UsageQuery } from "./schemas";

const DAY = 86_400_000;
const dayStart = (s: string) => new Date(`${s}T00:00:00.000Z`);
export const monthStart = (d = new Date()) => new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1));
export const nextMonthStart = (d = new Date()) => new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1));

/** Whose usage the caller sees: the whole organisation (admin, billing) or the keys they created (developer). */
function scopeOf(caller: Caller): { createdBy?: number } {
  if (can(caller.role, "usage.all")) return {};
  if (can(caller.role, "usage.own")) return { createdBy: caller.userId };
  throw forbidden();
}

/** The usage table for a query, with the key and endpoint filter choices the caller may use. */
export async function usageTable(caller: Caller, q: UsageQuery, now = new Date()) {
  const scope = scopeOf(caller);
  if (q.from && q.to && q.from > q.to) throw new PortalError(422, "“From” is after “To”: swap the dates to see this period.", { to: "Choose a day on or after “From”." });
  const to = q.to ? new Date(dayStart(q.to).getTime() + DAY) : new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate()) + DAY);
  const from = q.from ? dayStart(q.from) : new Date(to.getTime() - 30 * DAY);
  const filter = { organizationId: caller.organizationId, ...scope, from, to, keyId: q.keyId, endpoint: q.endpoint };
  const [page, keys, endpoints] = await Promise.all([
    listUsageByOrg({ ...filter, sort: q.sort, dir: q.dir, limit: q.pageSize, offset: (q.page - 1) * q.pageSize }),
    listKeysByOrg({ organizationId: caller.organizationId, createdBy: scope.createdBy }),
    listUsageEndpoints({ organizationId: caller.organizationId }),
  ]);
  // A key's prefix is its public id (never enough to call the API): billing contacts see it too, to tell keys apart.
  const showPrefix = can(caller.role, "usage.own");
  return {
    from: from.toISOString().slice(0, 10),
    to: new Date(to.getTime() - DAY).toISOString().slice(0, 10),
    page: q.page,
    pageSize: q.pageSize,
    total: page.total,
    totals: page.totals,
    rows: page.rows.map((r) => (showPrefix ? r : { ...r, keyPrefix: null })),
    keys: keys.map((k) => ({ id: k.key.id, label: k.key.label, prefix: showPrefix ? k.key.prefix : null })),
    endpoints,
  };
}

/** Daily units of the current month (UTC) against the plan's monthly quota, for the chart. */
export async function usageMonth(caller: Caller, now = new Date()) {
  const scope = scopeOf(caller);
  const from = monthStart(now);
  const to = nextMonthStart(now);
  const [daily, orgUnits] = await Promise.all([
    listDailyUnits({ organizationId: caller.organizationId, ...scope, from, to }),
    sumUnits({ organizationId: caller.organizationId, from, to }),
  ]);
  const byDay = new Map(daily.map((d) => [d.day, d]));
  const days: { day: string; units: number; cumulative: number }[] = [];
  let cumulative = 0;
  for (let t = from.getTime(); t < to.getTime(); t += DAY) {
    const day = new Date(t).toISOString().slice(0, 10);
    const units = byDay.get(day)?.units ?? 0;
    cumulative += units;
    days.push({ day, units, cumulative });
  }
  const plan = planOf(caller.plan);
  // quota is the plan's monthly cap; included is what its fee covers (units past it are billed per extra million)
  return { month: from.toISOString().slice(0, 7), plan: plan.label, quota: plan.monthlyUnits, included: plan.includedUnits, organizationUnits: orgUnits, days, scope: scope.createdBy ? "own" : "organization" };
}

const CSV_HEADER = ["day", "key_label", "key_prefix", "endpoint", "requests", "compute_units", "errors", "median_ms"];

/** RFC 4180 CSV; cells that a spreadsheet would read as a formula are prefixed with an apostrophe. */
export function usageCsv(rows: UsageRow[]): string {
  const cell = (v: unknown) => {
    let s = v === null || v === undefined ? "" : String(v);
    if (/^[=+\-@\t\r]/.test(s) && typeof v === "string") s = `'${s}`;
    return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
  };
  const lines = [CSV_HEADER.join(",")];
  for (const r of rows) lines.push([r.day, r.keyLabel, r.keyPrefix, r.endpoint, r.requests, r.units, r.errors, r.medianMs].map(cell).join(","));
  return lines.join("\r\n") + "\r\n";
}
