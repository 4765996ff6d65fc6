// Bad input in the portal is a 422 with a message, never a 500: impossible calendar days in the usage
// filters and a key's expiry, and a stray double quote inside an uploaded CSV value (nothing stored).
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { countDatasetChunks } from "@/lib/db/datasets";
import { isCalendarDay } from "@/lib/portal/schemas";
import { datasetServer, upload } from "../datasets/db-support";
import { cookieFor, makeTeam, portalServer } from "../portal/support";

const portal = portalServer();
const datasets = datasetServer();
let T: Awaited<ReturnType<typeof makeTeam>>;
let admin: string;
beforeAll(async () => {
  T = await makeTeam("Kestrel Precision Works");
  admin = await cookieFor(T.admin.id);
});
afterAll(async () => {
  await new Promise<void>((r) => portal.close(() => r()));
  await new Promise<void>((r) => datasets.close(() => r()));
});

describe("calendar days", () => {
  it("knows the calendar (common practice: Gregorian leap years)", () => {
    expect(["2026-01-31", "2028-02-29", "2000-02-29", "2026-12-01"].every(isCalendarDay)).toBe(true);
    expect(["2026-99-99", "2026-02-29", "1900-02-29", "2026-04-31", "2026-00-10", "2026-1-1", "26-01-01"].some(isCalendarDay)).toBe(false);
  });

  for (const [field, value] of [
    ["to", "2026-99-99"],
    ["from", "2026-02-30"],
    ["to", "2026-13-01"],
  ] as const) {
    for (const path of ["/api/portal/usage", "/api/portal/usage/csv"]) {
      it(`${path}?${field}=${value} answers 422 naming the field`, async () => {
        const res = await request(portal).get(`${path}?${field}=${value}`).set("cookie", admin);
        expect(res.status, res.text).toBe(422);
        expect(res.body.fields[field]).toMatch(/does not exist in the calendar/);
      });
    }
  }

  it("a key expiring on a day that does not exist is refused with a message", async () => {
    const res = await request(portal).post("/api/portal/keys").set("cookie", admin).set("content-type", "application/json").send({ label: "night batch", scopes: ["moments"], expiresOn: "2099-02-30" });
    expect(res.status).toBe(422);
    expect(res.body.fields.expiresOn).toMatch(/does not exist in the calendar/);
  });
});

describe("stray quotes in uploaded CSV", () => {
  const cases: { name: string; body: string; fields: Record<string, string>; line: number; where: RegExp }[] = [
    { name: "a quote after digits", body: 'claim_id,loss\nH-1,1200.5\nH-2,12"5\nH-3,7\n', fields: { column: "loss" }, line: 3, where: /line 3, column 2/ },
    { name: "a quote after a closed quoted value", body: 'claim_id,loss\nH-1,"830"x\n', fields: { column: "loss" }, line: 2, where: /line 2, column 2/ },
    { name: "a plain list with an inch mark", body: '310\n275"\n1280\n', fields: {}, line: 2, where: /line 2/ },
  ];
  for (const c of cases) {
    it(`${c.name}: 422 with the line, nothing stored`, async () => {
      const before = await countDatasetChunks({ organizationId: T.org.id });
      const res = await upload(datasets, admin, c.body, { name: `Quotes ${c.line}`, ...c.fields });
      expect(res.status, JSON.stringify(res.body)).toBe(422);
      expect(res.body.error).toMatch(c.where);
      expect(res.body.error).toMatch(/double quote/);
      expect(JSON.stringify(res.body)).toContain(`"line":${c.line}`);
      expect(await countDatasetChunks({ organizationId: T.org.id })).toEqual(before);
    });
  }
});
