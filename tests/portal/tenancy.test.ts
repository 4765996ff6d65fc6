// A person in two organisations works in both at once (two tabs): every call names its organisation, the
// server checks it against their memberships on each request, and no shared cookie decides where data lands.
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { datasetServer, upload } from "../datasets/db-support";
import { cookieFor, join, makeTeam, makeUser, ORG, portalServer } from "./support";

const portal = portalServer();
const data = datasetServer();
let K: Awaited<ReturnType<typeof makeTeam>>;
let H: Awaited<ReturnType<typeof makeTeam>>;
let both: { id: number };
let cookie: string;
let slugs: Record<number, string>;

beforeAll(async () => {
  K = await makeTeam("Kestrel Precision Works");
  H = await makeTeam("Harrowgate Mutual");
  both = await makeUser("Wen Twofold");
  await join(both.id, K.org.id, "admin");
  await join(both.id, H.org.id, "developer");
  cookie = await cookieFor(both.id);
  const me = await request(portal).get("/api/portal/me").set("cookie", cookie);
  slugs = Object.fromEntries(me.body.memberships.map((m: { organizationId: number; slug: string }) => [m.organizationId, m.slug]));
});
afterAll(async () => {
  await new Promise<void>((r) => portal.close(() => r()));
  await new Promise<void>((r) => data.close(() => r()));
});

const names = async (org: string) => (await request(data).get("/api/portal/datasets").set("cookie", cookie).set(ORG, org)).body.datasets.map((d: { name: string }) => d.name);

describe("tenancy across tabs", () => {
  it("an upload from the Kestrel tab lands in Kestrel while another tab works in Harrowgate", async () => {
    // Tab B opens Harrowgate (before the fix this set a cookie that tab A's next upload followed).
    const tabB = await request(portal).get("/api/portal/me").set("cookie", `${cookie}; sumfold-org=${H.org.id}`).set(ORG, slugs[H.org.id]);
    expect(tabB.body.organization.id).toBe(H.org.id);
    // Tab A uploads, naming Kestrel as its page does.
    const up = await upload(data, `${cookie}; sumfold-org=${H.org.id}`, "1.5\n2.5\n", { name: "Gauge drift", org: slugs[K.org.id] });
    expect(up.status).toBe(201);
    expect(await names(slugs[K.org.id])).toContain("Gauge drift");
    expect(await names(slugs[H.org.id])).not.toContain("Gauge drift");
    // The numeric id names the organisation too.
    expect(await names(String(K.org.id))).toContain("Gauge drift");
  });

  it("each call answers with the role held in the organisation it names", async () => {
    const inK = await request(portal).get("/api/portal/me").set("cookie", cookie).set(ORG, slugs[K.org.id]);
    const inH = await request(portal).get("/api/portal/me").set("cookie", cookie).set(ORG, slugs[H.org.id]);
    expect([inK.body.role, inH.body.role]).toEqual(["admin", "developer"]);
    // Admin in Kestrel, developer in Harrowgate: the members list follows the named organisation, not the last one opened.
    expect((await request(portal).get("/api/portal/members").set("cookie", cookie).set(ORG, slugs[K.org.id])).status).toBe(200);
    expect((await request(portal).get("/api/portal/members").set("cookie", cookie).set(ORG, slugs[H.org.id])).status).toBe(403);
    // Kestrel's key is not reachable from a call that names Harrowgate.
    const revoke = await request(portal).post(`/api/portal/keys/${K.devKey.id}/revoke`).set("cookie", cookie).set(ORG, slugs[H.org.id]).set("content-type", "application/json").send({});
    expect(revoke.status).toBe(404);
  });

  it("a mutation that names no organisation is refused for a person in several, and nothing is stored", async () => {
    const res = await upload(data, cookie, "3\n4\n", { name: "Unplaced" });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatch(/several organisations/);
    expect(await names(slugs[K.org.id])).not.toContain("Unplaced");
    expect(await names(slugs[H.org.id])).not.toContain("Unplaced");
    const key = await request(portal).post("/api/portal/keys").set("cookie", cookie).set("content-type", "application/json").send({ label: "nowhere", scopes: ["moments"] });
    expect(key.status).toBe(400);
  });

  it("naming an organisation the person does not belong to answers 404, by slug, by id and by a forged cookie", async () => {
    const other = await makeTeam("Elsewhere Ltd");
    expect((await request(portal).get("/api/portal/me").set("cookie", cookie).set(ORG, String(other.org.id))).status).toBe(404);
    expect((await request(portal).get(`/api/portal/keys?org=${other.org.id}`).set("cookie", cookie)).status).toBe(404);
    // The old org cookie is no longer read: with it alone, a person in several organisations must still name one.
    expect((await request(portal).get("/api/portal/keys").set("cookie", `${cookie}; sumfold-org=${other.org.id}`)).status).toBe(400);
  });

  it("a person with one organisation needs not name it; a person with none can create one", async () => {
    expect((await request(portal).get("/api/portal/keys").set("cookie", await cookieFor(K.developer.id))).status).toBe(200);
    const loner = await makeUser("Nora Nowhere");
    const c = await cookieFor(loner.id);
    const me = await request(portal).get("/api/portal/me").set("cookie", c);
    expect(me.status).toBe(403);
    const created = await request(portal).post("/api/portal/organizations").set("cookie", c).set("content-type", "application/json").send({ name: "Nowhere Labs" });
    expect(created.status).toBe(201);
    const after = await request(portal).get("/api/portal/me").set("cookie", c);
    expect(after.body.organization.name).toBe("Nowhere Labs");
    expect(after.body.role).toBe("admin");
    expect((await request(portal).post("/api/portal/organizations").set("content-type", "application/json").send({ name: "Anon" })).status).toBe(401);
  });
});
