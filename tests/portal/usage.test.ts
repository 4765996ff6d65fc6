// The usage table (aggregation, median, filters, sorting, paging, scoping), its CSV, the month chart data, and
// the quota e-mails at 80% and 100%.
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { PLANS } from "@/lib/api/plans";
import { getDb } from "@/lib/db/client";
import { usageEvents, type NewUsageEvent } from "@/lib/db/schema";
import { notifyQuotaThresholds } from "@/lib/portal/quota";
import { cookieFor, makeTeam, mailTo, portalServer, uniq, waitForMail } from "./support";

const server = portalServer();
let A: Awaited<ReturnType<typeof makeTeam>>;
let B: Awaited<ReturnType<typeof makeTeam>>;
const day = (offset: number, hour = 10) => {
  const d = new Date();
  d.setUTCDate(d.getUTCDate() - offset);
  d.setUTCHours(hour, 0, 0, 0);
  return d;
};
const iso = (d: Date) => d.toISOString().slice(0, 10);
const ev = (e: Partial<NewUsageEvent> & Pick<NewUsageEvent, "keyId" | "organizationId" | "endpoint">): NewUsageEvent => ({
  requestId: `t-${uniq()}-${uniq()}`,
  status: 200,
  durationMs: 10,
  computeUnits: 1,
  createdAt: day(1),
  ...e,
});

// The median of an even count is the mean of the middle two (MariaDB MEDIAN = PERCENTILE_CONT(0.5); common practice).
const durations = [12, 3, 40, 7];

beforeAll(async () => {
  A = await makeTeam("Corvel Reinsurance");
  B = await makeTeam("Dunmore Castings");
  const rows: NewUsageEvent[] = [
    ...durations.map((d, i) => ev({ keyId: A.devKey.id, organizationId: A.org.id, endpoint: "POST /api/v1/moments", durationMs: d, computeUnits: 5, status: i === 0 ? 422 : 200 })),
    ev({ keyId: A.devKey.id, organizationId: A.org.id, endpoint: "POST /api/v1/density", computeUnits: 30, createdAt: day(2) }),
    ev({ keyId: A.adminKey.id, organizationId: A.org.id, endpoint: "POST /api/v1/moments", computeUnits: 100, createdAt: day(1) }),
    ev({ keyId: A.adminKey.id, organizationId: A.org.id, endpoint: "POST /api/v1/moments", computeUnits: 7, createdAt: day(40) }),
    ev({ keyId: B.adminKey.id, organizationId: B.org.id, endpoint: "POST /api/v1/moments", computeUnits: 999, createdAt: day(1) }),
  ];
  await getDb().insert(usageEvents).values(rows);
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

const get = async (userId: number, path: string) => request(server).get(path).set("cookie", await cookieFor(userId));

describe("usage table", () => {
  it("aggregates by day x key x endpoint with requests, units, errors and median latency; org-wide for admins", async () => {
    const res = await get(A.admin.id, "/api/portal/usage?sort=units&dir=desc");
    expect(res.status).toBe(200);
    const rows = res.body.rows as { day: string; keyId: number; endpoint: string; requests: number; units: number; errors: number; medianMs: number }[];
    expect(rows.map((r) => [r.keyId, r.endpoint, r.units])).toEqual([
      [A.adminKey.id, "POST /api/v1/moments", 100],
      [A.devKey.id, "POST /api/v1/density", 30],
      [A.devKey.id, "POST /api/v1/moments", 20],
    ]);
    const m = rows[2];
    expect(m).toMatchObject({ day: iso(day(1)), requests: 4, errors: 1, medianMs: (7 + 12) / 2 });
    expect(res.body.totals).toEqual({ requests: 6, units: 150, errors: 1 });
    // Organisation B's 999 units never appear; the 40-day-old row is outside the default 30 days.
    expect(rows.some((r) => r.units === 999 || r.units === 7)).toBe(false);
  });

  it("a developer sees only usage of their own keys; billing sees the organisation, keys told apart by their public prefix", async () => {
    const dev = await get(A.developer.id, "/api/portal/usage");
    expect(new Set(dev.body.rows.map((r: { keyId: number }) => r.keyId))).toEqual(new Set([A.devKey.id]));
    expect(dev.body.keys.map((k: { id: number }) => k.id)).toEqual([A.devKey.id]);
    const billing = await get(A.billing.id, "/api/portal/usage");
    expect(billing.body.totals.units).toBe(150);
    // The prefix is a key's public id (never enough to call the API); the CSV's key_prefix column is no longer empty for billing.
    expect(billing.body.rows.every((r: { keyPrefix: string | null }) => /^sfk_/.test(r.keyPrefix ?? ""))).toBe(true);
    expect(billing.body.keys.every((k: { prefix: string | null }) => /^sfk_/.test(k.prefix ?? ""))).toBe(true);
  });

  it("filters by key, endpoint and date range; sorts; pages", async () => {
    const byKey = await get(A.admin.id, `/api/portal/usage?keyId=${A.adminKey.id}`);
    expect(byKey.body.rows.map((r: { units: number }) => r.units)).toEqual([100]);
    const byEndpoint = await get(A.admin.id, `/api/portal/usage?endpoint=${encodeURIComponent("POST /api/v1/density")}`);
    expect(byEndpoint.body.rows.map((r: { units: number }) => r.units)).toEqual([30]);
    const wide = await get(A.admin.id, `/api/portal/usage?from=${iso(day(45))}&to=${iso(day(0))}&sort=units&dir=asc`);
    expect(wide.body.rows.map((r: { units: number }) => r.units)).toEqual([7, 20, 30, 100]);
    const p2 = await get(A.admin.id, `/api/portal/usage?from=${iso(day(45))}&sort=units&dir=asc&pageSize=3&page=2`);
    expect(p2.body.total).toBe(4);
    expect(p2.body.rows.map((r: { units: number }) => r.units)).toEqual([100]);
    const foreignKey = await get(A.admin.id, `/api/portal/usage?keyId=${B.adminKey.id}`);
    expect(foreignKey.body.rows).toEqual([]);
    expect((await get(A.admin.id, "/api/portal/usage?from=yesterday")).status).toBe(422);
  });

  it("exports the filtered table as CSV", async () => {
    const res = await get(A.admin.id, `/api/portal/usage/csv?sort=units&dir=desc`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/text\/csv/);
    expect(res.headers["content-disposition"]).toMatch(/attachment; filename="sumfold-usage-/);
    const lines = res.text.trim().split("\r\n");
    expect(lines[0]).toBe("day,key_label,key_prefix,endpoint,requests,compute_units,errors,median_ms");
    expect(lines).toHaveLength(4);
    expect(lines[1]).toBe(`${iso(day(1))},admin batch,${A.adminKey.prefix},POST /api/v1/moments,1,100,0,10`);
  });

  it("gives the month's daily units and running total against the plan quota", async () => {
    const res = await get(A.billing.id, "/api/portal/usage/month");
    expect(res.body.quota).toBe(PLANS.starter.monthlyUnits);
    // the cap and, below it, the units the fee includes (the page says where billing for extra units starts)
    expect(res.body.included).toBe(PLANS.starter.includedUnits);
    expect(res.body.included).toBeLessThan(res.body.quota);
    const days = res.body.days as { day: string; units: number; cumulative: number }[];
    const now = new Date();
    expect(days[0].day).toBe(`${now.toISOString().slice(0, 7)}-01`);
    expect(days.at(-1)!.cumulative).toBe(days.reduce((s, d) => s + d.units, 0));
    expect(res.body.organizationUnits).toBe(days.at(-1)!.cumulative);
  });
});

describe("quota e-mails", () => {
  it("mail billing contacts and admins at 80% and at 100%, once per threshold per month", async () => {
    const team = await makeTeam("Marlpit Insurance");
    const quota = PLANS.starter.monthlyUnits;
    const now = new Date();
    const insert = (units: number) => getDb().insert(usageEvents).values(ev({ keyId: team.devKey.id, organizationId: team.org.id, endpoint: "POST /api/v1/moments", computeUnits: units, createdAt: now }));
    await insert(Math.floor(quota * 0.79));
    await notifyQuotaThresholds([team.org.id], now);
    expect(await mailTo(team.billing.email)).toHaveLength(0);
    await insert(Math.ceil(quota * 0.01));
    await notifyQuotaThresholds([team.org.id, team.org.id], now);
    await notifyQuotaThresholds([team.org.id], now);
    const at80 = await waitForMail(team.billing.email);
    expect(at80.map((m) => m.subject)).toEqual(["[Marlpit Insurance] 80% of this month's compute units used"]);
    expect((await waitForMail(team.admin.email)).map((m) => m.subject)).toEqual(["[Marlpit Insurance] 80% of this month's compute units used"]);
    expect(await mailTo(team.developer.email)).toHaveLength(0);
    await insert(Math.ceil(quota * 0.2));
    await Promise.all([notifyQuotaThresholds([team.org.id], now), notifyQuotaThresholds([team.org.id], now)]);
    const all = await waitForMail(team.billing.email, 2);
    expect(all.map((m) => m.subject).sort()).toEqual([
      "[Marlpit Insurance] 100% of this month's compute units used",
      "[Marlpit Insurance] 80% of this month's compute units used",
    ]);
  });
});
