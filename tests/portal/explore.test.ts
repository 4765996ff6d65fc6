// The explorer's session-authenticated runs: roles, and the same validation and results as the public path.
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as explore from "@/app/api/portal/explore/[op]/route";
import { routeServer, type RouteModule } from "../support/route-server";
import { cookieFor, makeTeam } from "./support";

const server = routeServer({ "/api/portal/explore/[op]": explore as RouteModule });
let T: Awaited<ReturnType<typeof makeTeam>>;
beforeAll(async () => {
  T = await makeTeam("Ostrava Bearings");
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

const run = async (userId: number | null, op: string, body: unknown) => {
  let r = request(server).post(`/api/portal/explore/${op}`).set("content-type", "application/json");
  if (userId) r = r.set("cookie", await cookieFor(userId));
  return r.send(JSON.stringify(body));
};
const normal = { family: "normal", mu: 12, sigma: 0.5 };

describe("explorer runs", () => {
  it("developers and admins run; billing contacts and strangers do not", async () => {
    expect((await run(T.developer.id, "moments", { model: normal, order: 2 })).status).toBe(200);
    expect((await run(T.admin.id, "moments", { model: normal, order: 2 })).status).toBe(200);
    expect((await run(T.billing.id, "moments", { model: normal, order: 2 })).status).toBe(403);
    expect((await run(null, "moments", { model: normal, order: 2 })).status).toBe(401);
    expect((await run(T.developer.id, "convolve", { model: normal })).status).toBe(404);
    expect((await run(T.developer.id, "constructor", { model: normal })).status).toBe(404);
  });

  it("moments of a normal law: mean mu, variance sigma^2 (closed form; common practice)", async () => {
    const res = await run(T.developer.id, "moments", { model: normal, order: 2 });
    expect(Math.abs(res.body.mean - 12)).toBeLessThan(1e-9);
    expect(Math.abs(res.body.variance - 0.25)).toBeLessThan(1e-9);
  });

  it("quantiles of a normal law: the 0.975 level is mu + 1.959964 sigma (standard normal 97.5% point; common practice)", async () => {
    const res = await run(T.developer.id, "quantiles", { model: normal, p: [0.975] });
    expect(res.status).toBe(200);
    expect(Math.abs(res.body.x[0] - (12 + 1.959964 * 0.5))).toBeLessThan(1e-5);
  });

  it("density returns x, pdf and cdf of equal length", async () => {
    const res = await run(T.developer.id, "density", { model: normal });
    expect(res.status).toBe(200);
    expect(res.body.x.length).toBeGreaterThan(10);
    expect(res.body.pdf).toHaveLength(res.body.x.length);
    expect(res.body.cdf).toHaveLength(res.body.x.length);
  });

  it("an invalid model answers 422 problem+json with a pointer into the model", async () => {
    const res = await run(T.developer.id, "density", { model: { family: "normal", mu: 0, sigma: -1 } });
    expect(res.status).toBe(422);
    expect(res.headers["content-type"]).toMatch(/problem\+json/);
    expect(res.body.errors[0].pointer).toBe("/model/sigma");
  });
});
