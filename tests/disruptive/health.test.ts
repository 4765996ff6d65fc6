// GET /api/v1/health reports the database, and answers 503 while it is down.
import supertest from "supertest";
import { describe, expect, it } from "vitest";
import * as health from "@/app/api/v1/health/route";
import { startMariaDb, stopMariaDb } from "../../scripts/lib/mariadb";
import { testLayout } from "../support/layout";
import { routeServer } from "../support/route-server";

const layout = testLayout();
const app = routeServer({ "/api/v1/health": health });

describe("GET /api/v1/health", () => {
  it("reports the database reachable, then unreachable (503) while stopped, then reachable again", async () => {
    const up = await supertest(app).get("/api/v1/health");
    expect(up.status).toBe(200);
    expect(up.body).toMatchObject({ status: "ok", database: "reachable" });

    await stopMariaDb(layout.db);
    try {
      const down = await supertest(app).get("/api/v1/health");
      expect(down.status).toBe(503);
      expect(down.body).toMatchObject({ status: "degraded", database: "unreachable" });
    } finally {
      await startMariaDb(layout.db, () => {});
    }
    const back = await supertest(app).get("/api/v1/health");
    expect(back.status).toBe(200);
    expect(back.body.database).toBe("reachable");
  });

  it("is served by next start without a key", async () => {
    const res = await fetch(`${process.env.SUMFOLD_TEST_BASE_URL}/api/v1/health`);
    expect(res.status).toBe(200);
    expect(res.headers.get("cache-control")).toContain("no-store");
  });
});
