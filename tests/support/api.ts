import { randomBytes } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import supertest from "supertest";
import { beforeAll } from "vitest";
import * as cf from "@/app/api/v1/cf/route";
import * as convolve from "@/app/api/v1/convolve/route";
import * as density from "@/app/api/v1/density/route";
import * as families from "@/app/api/v1/families/route";
import * as health from "@/app/api/v1/health/route";
import * as moments from "@/app/api/v1/moments/route";
import * as openapi from "@/app/api/v1/openapi.json/route";
import * as quantiles from "@/app/api/v1/quantiles/route";
import * as risk from "@/app/api/v1/risk/route";
import { ALL_SCOPES, type Scope } from "@/lib/api/scopes";
import { getDb } from "@/lib/db/client";
import { createKey } from "@/lib/db/keys";
import { organizations, usageEvents } from "@/lib/db/schema";
import { routeServer } from "./route-server";

/** The public API's route handlers behind one in-process server for supertest. */
export const apiServer = () =>
  routeServer({
    "/api/v1/cf": cf,
    "/api/v1/density": density,
    "/api/v1/quantiles": quantiles,
    "/api/v1/risk": risk,
    "/api/v1/moments": moments,
    "/api/v1/convolve": convolve,
    "/api/v1/families": families,
    "/api/v1/health": health,
    "/api/v1/openapi.json": openapi,
  });

/** A fresh organisation (invented) with one key; returns the secret. */
export async function orgWithKey(opts: { plan?: string; scopes?: Scope[] } = {}) {
  const slug = `test-${randomBytes(5).toString("hex")}`;
  const [res] = await getDb().insert(organizations).values({ slug, name: `Test org ${slug}`, plan: opts.plan ?? "scale" });
  const organizationId = res.insertId;
  const { key, secret } = await createKey({
    organizationId,
    createdBy: null,
    label: "test key",
    scopes: opts.scopes ?? ALL_SCOPES,
    actor: { type: "system" },
  });
  return { organizationId, key, secret, slug };
}

export async function usageCount(where: { organizationId: number }) {
  const [row] = await getDb()
    .select({ n: sql<number>`count(*)` })
    .from(usageEvents)
    .where(eq(usageEvents.organizationId, where.organizationId));
  return Number(row.n);
}

/** The test file's client of the public API: a fresh organisation's key (made in beforeAll) and a JSON POST with it. */
export function keyedClient() {
  const app = apiServer();
  let key = "";
  beforeAll(async () => {
    key = (await orgWithKey()).secret;
  });
  return {
    app,
    get key() {
      return key;
    },
    post: (path: string, body: unknown) => supertest(app).post(path).set("authorization", `Bearer ${key}`).set("content-type", "application/json").send(JSON.stringify(body)),
  };
}
