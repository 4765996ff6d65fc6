import "server-only";
import { auditFacets, listAuditEvents } from "@/lib/db/audit-log";
import type { AuditQuery } from "./schemas";
import type { Caller } from "./tenancy";

export interface AuditRow {
  id: number;
  at: string;
  who: string;
  whoEmail: string | null;
  action: string;
  target: string;
  detail: Record<string, unknown> | null;
  ip: string | null;
  userAgent: string | null;
}

const dayStart = (d: string) => new Date(`${d}T00:00:00Z`);
const nextDay = (d: string) => new Date(dayStart(d).getTime() + 86_400_000);

/** The log rows for the filters, in words: who (person, key or Sumfold itself), what, on what, when, from where. */
export async function auditLog(caller: Caller, q: AuditQuery): Promise<{ rows: AuditRow[]; truncated: boolean; facets: Awaited<ReturnType<typeof auditFacets>> }> {
  const rows = await listAuditEvents({
    organizationId: caller.organizationId,
    from: q.from ? dayStart(q.from) : undefined,
    to: q.to ? nextDay(q.to) : undefined,
    action: q.action,
    actorUserId: q.actorUserId,
    limit: q.limit + 1,
  });
  const facets = await auditFacets({ organizationId: caller.organizationId });
  return {
    truncated: rows.length > q.limit,
    facets,
    rows: rows.slice(0, q.limit).map((r) => ({
      id: r.id,
      at: r.at.toISOString(),
      who: r.actorType === "user" ? (r.actorName ?? "a former member") : r.actorType === "key" ? "an API key" : "Sumfold (operator or scheduled job)",
      whoEmail: r.actorEmail,
      action: r.action,
      target: r.targetKeyPrefix ? `key ${r.targetKeyPrefix}` : `${r.targetType.replace(/_/g, " ")}${r.targetId ? ` ${r.targetId}` : ""}`,
      detail: r.detail ?? null,
      ip: r.ip,
      userAgent: r.userAgent,
    })),
  };
}

const cell = (v: unknown) => {
  const s = v === null || v === undefined ? "" : typeof v === "string" ? v : JSON.stringify(v);
  // RFC 4180 quoting; a leading = + - @ is prefixed so a spreadsheet never runs a cell as a formula
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
};

export function auditCsv(rows: AuditRow[]): string {
  const head = ["time_utc", "who", "email", "action", "target", "detail", "ip", "user_agent"];
  const lines = rows.map((r) => [r.at, r.who, r.whoEmail, r.action, r.target, r.detail, r.ip, r.userAgent].map(cell).join(","));
  return `${[head.join(","), ...lines].join("\r\n")}\r\n`;
}
