// Long work on the distributed queue: jobs submitted through the API run in separate worker processes (two here,
// as on two machines), answer the same result the synchronous endpoint gives, and are visible to their own
// organisation only.
import { spawn, type ChildProcess } from "node:child_process";
import { resolve } from "node:path";
import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as jobs from "@/app/api/v1/jobs/route";
import * as job from "@/app/api/v1/jobs/[id]/route";
import * as explore from "@/app/api/portal/explore/[op]/route";
import * as exploreJobs from "@/app/api/portal/explore/jobs/route";
import * as exploreJob from "@/app/api/portal/explore/jobs/[id]/route";
import { cookieFor, makeTeam } from "../portal/support";
import { flushUsage } from "@/lib/api/metering";
import { jobsQueue } from "@/lib/jobs/queue";
import { JOB_RESULTS, JobResponse } from "@/lib/api/schemas/jobs";
import { apiServer, orgWithKey } from "../support/api";
import { routeServer, type RouteModule } from "../support/route-server";

const REPO = resolve(import.meta.dirname, "../..");
const workers: ChildProcess[] = [];
const sync = apiServer();
const app = routeServer({
  "/api/v1/jobs": jobs as RouteModule,
  "/api/v1/jobs/[id]": job as RouteModule,
  "/api/portal/explore/jobs": exploreJobs as RouteModule,
  "/api/portal/explore/jobs/[id]": exploreJob as RouteModule,
  "/api/portal/explore/[op]": explore as RouteModule,
});

function startWorker(): Promise<ChildProcess> {
  return new Promise((ok, fail) => {
    const child = spawn(resolve(REPO, "node_modules/.bin/tsx"), ["--conditions=react-server", "--tsconfig", "tsconfig.json", "scripts/worker.ts"], {
      cwd: REPO,
      env: { ...process.env, SUMFOLD_COMPUTE_THREADS: "1", NODE_ENV: "production" },
      stdio: ["ignore", "pipe", "inherit"],
    });
    let out = "";
    child.stdout!.on("data", (d) => {
      out += String(d);
      if (out.includes("ready")) ok(child);
    });
    child.once("exit", (code) => fail(new Error(`worker exited (${code}): ${out}`)));
  });
}

beforeAll(async () => {
  workers.push(await startWorker(), await startWorker());
}, 120_000);

afterAll(async () => {
  await Promise.all(workers.map((w) => new Promise((r) => (w.once("exit", r), w.kill("SIGTERM")))));
  await new Promise<void>((r) => app.close(() => r()));
});

const submit = (key: string, operation: string, body: unknown) =>
  supertest(app).post("/api/v1/jobs").set("authorization", `Bearer ${key}`).set("content-type", "application/json").send(JSON.stringify({ operation, body }));
const poll = (key: string, id: string) => supertest(app).get(`/api/v1/jobs/${id}`).set("authorization", `Bearer ${key}`);

async function waitDone(key: string, id: string) {
  for (;;) {
    const r = await poll(key, id);
    if (r.status !== 200 || r.body.status === "succeeded" || r.body.status === "failed") return r;
    await new Promise((s) => setTimeout(s, 100));
  }
}

const strip = ({ meta: _meta, ...rest }: Record<string, unknown>) => rest;

describe("jobs", () => {
  it("answers 202 with the job URL; every job finishes with the synchronous endpoint's answer, across two worker processes", async () => {
    const o = await orgWithKey();
    const requests = [
      ["quantiles", { model: { sum: [{ family: "gamma", shape: 2, rate: 1 }, { family: "normal", mu: 0, sigma: 0.6 }] }, p: [0.5, 0.9, 0.995], expectedShortfall: true }],
      ["density", { model: { family: "gamma", shape: 3, rate: 2 }, grid: { from: 0, to: 6, count: 64 } }],
      ["moments", { model: { compound: { count: { family: "poisson", lambda: 4 }, each: { family: "gamma", shape: 2, rate: 1 } } }, order: 4 }],
      ["cf", { model: { family: "normal", mu: 1, sigma: 2 }, t: [0, 0.5, 1] }],
      ["convolve", { terms: [{ origin: 0, step: 1, p: [0.6, 0.3, 0.1] }], power: 3 }],
      ["quantiles", { model: { family: "gamma", shape: 1.5, rate: 2 }, p: [0.1, 0.99] }],
      ["density", { model: { sum: [{ family: "normal", mu: 0, sigma: 1 }, { family: "gamma", shape: 4, rate: 1 }] }, x: [0.25, 1, 1.5] }],
      ["quantiles", { model: { family: "normal", mu: 3, sigma: 2 }, p: [0.5, 0.95] }],
    ] as const;
    const submitted = [];
    for (const [op, body] of requests) {
      const res = await submit(o.secret, op, body);
      expect(res.status, JSON.stringify(res.body)).toBe(202);
      expect(res.body.url).toMatch(new RegExp(`/api/v1/jobs/${res.body.id}$`));
      expect(res.headers.location).toBe(res.body.url);
      expect(["queued", "running", "succeeded"]).toContain(res.body.status);
      submitted.push({ op, body, id: res.body.id as string });
    }
    const workersSeen = new Set<string>();
    for (const s of submitted) {
      const done = await waitDone(o.secret, s.id);
      expect(done.body.status, JSON.stringify(done.body).slice(0, 400)).toBe("succeeded");
      const direct = await supertest(sync).post(`/api/v1/${s.op}`).set("authorization", `Bearer ${o.secret}`).set("content-type", "application/json").send(JSON.stringify(s.body));
      expect(direct.status, `${s.op}: ${JSON.stringify(direct.body).slice(0, 300)}`).toBe(200);
      expect(done.body.result).toEqual(JSON.parse(JSON.stringify(strip(direct.body))));
      // the published schemas describe the job exactly: the whole view, and its result by the operation's own schema
      expect(JobResponse.parse(done.body)).toEqual(done.body);
      expect(JOB_RESULTS[s.op].parse(done.body.result)).toEqual(done.body.result);
      expect(done.body.computeUnits).toBe(Math.max(1, Math.ceil(done.body.computeMs / 10)));
      expect(Date.parse(done.body.expiresAt) - Date.parse(done.body.finishedAt)).toBe(24 * 3600 * 1000);
      workersSeen.add((await jobsQueue().getJob(s.id))!.returnvalue.worker);
    }
    // the two started here (the full suite also runs one beside its server)
    expect(workersSeen.size).toBeGreaterThanOrEqual(2);
    // each job wrote its own usage row with the units of its work
    await new Promise((r) => setTimeout(r, 1200));
    await flushUsage();
  }, 120_000);

  it("another organisation's key gets 404 for the job, like an unknown id", async () => {
    const a = await orgWithKey();
    const b = await orgWithKey();
    const res = await submit(a.secret, "moments", { model: { family: "normal", mu: 0, sigma: 1 }, order: 2 });
    expect(res.status).toBe(202);
    expect((await poll(b.secret, res.body.id)).status).toBe(404);
    expect((await poll(a.secret, "job_AAAAAAAAAAAAAAAAAAAAAAAA")).status).toBe(404);
    const done = await waitDone(a.secret, res.body.id);
    expect(done.body.status, JSON.stringify(done.body).slice(0, 300)).toBe("succeeded");
    expect(done.body.result.variance).toBeCloseTo(1, 12); // N(0,1): variance 1 (common practice)
  }, 60_000);

  it("a body the operation's schema refuses answers 422 pointing under /body, and a key without the scope 403", async () => {
    const o = await orgWithKey();
    const bad = await submit(o.secret, "moments", { model: { family: "normal", mu: 0, sigma: 1 }, order: 0 });
    expect(bad.status).toBe(422);
    expect(bad.body.errors[0].pointer).toBe("/body/order");
    const narrow = await orgWithKey({ scopes: ["moments"] });
    expect((await submit(narrow.secret, "density", { model: { family: "normal", mu: 0, sigma: 1 } })).status).toBe(403);
  });

  it("a failing computation ends as failed with the problem the synchronous endpoint gives", async () => {
    const o = await orgWithKey();
    const res = await submit(o.secret, "density", { model: { family: "normal", mu: 0, sigma: 1 }, grid: { from: -1e308, to: 1e308, count: 3 } });
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    const done = await waitDone(o.secret, res.body.id);
    expect(done.body.status).toBe("failed");
    expect(done.body.problem.status).toBe(422);
    expect(done.body.problem.type).toMatch(/#validation$/);
    expect(done.body.problem.errors[0].pointer).toBe("/grid");
    expect(JobResponse.parse(done.body)).toEqual(done.body);
  }, 60_000);

  it("the explorer's heavy runs go through the same queue: a job of its own organisation, the explorer's own answer", async () => {
    const T = await makeTeam("Marsh Assurance");
    const U = await makeTeam("Fenwick Tooling");
    const cookie = await cookieFor(T.developer.id);
    const body = { model: { sum: [{ family: "gamma", shape: 2, rate: 1 }, { family: "normal", mu: 0, sigma: 0.6 }] }, p: [0.5, 0.99], expectedShortfall: true };
    const sub = await supertest(app).post("/api/portal/explore/jobs").set("cookie", cookie).set("content-type", "application/json").send(JSON.stringify({ operation: "quantiles", body }));
    expect(sub.status, JSON.stringify(sub.body)).toBe(202);
    let view = sub.body;
    while (view.status !== "succeeded" && view.status !== "failed") {
      await new Promise((r) => setTimeout(r, 100));
      view = (await supertest(app).get(`/api/portal/explore/jobs/${sub.body.id}`).set("cookie", cookie)).body;
    }
    expect(view.status).toBe("succeeded");
    const direct = await supertest(app).post("/api/portal/explore/quantiles").set("cookie", cookie).set("content-type", "application/json").send(JSON.stringify(body));
    const { elapsedMs: _e, computeMs: _c, computeUnits: _u, ...same } = direct.body;
    expect(view.result).toEqual(same);
    expect((await supertest(app).get(`/api/portal/explore/jobs/${sub.body.id}`).set("cookie", await cookieFor(U.developer.id))).status).toBe(404);
  }, 60_000);
});
