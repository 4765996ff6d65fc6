// The portal's upload handler against the real MariaDB: happy paths, every bad-file case (readable message,
// nothing stored), limits, raw file kept, versions, roles and organisations.
import { createHash } from "node:crypto";
import jStatDefault from "jstat";
import request from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as list from "@/app/api/portal/datasets/route";
import { countDatasetChunks } from "@/lib/db/datasets";
import { MAX_CONCURRENT_UPLOADS, MAX_UPLOAD_BYTES } from "@/lib/datasets/limits";
import { cookieFor, makeTeam } from "../portal/support";
import { datasetServer, upload } from "./db-support";
import { near } from "./support";

const jStat = jStatDefault as unknown as { mean(x: number[]): number; stdev(x: number[], sample?: boolean): number; quantiles(x: number[], p: number[], a: number, b: number): number[] };

const server = datasetServer();
let T: Awaited<ReturnType<typeof makeTeam>>;
let O: Awaited<ReturnType<typeof makeTeam>>;
let dev: string;
let admin: string;
let billing: string;
let other: string;

beforeAll(async () => {
  T = await makeTeam("Harrowgate Mutual");
  O = await makeTeam("Kestrel Fasteners");
  dev = await cookieFor(T.developer.id);
  admin = await cookieFor(T.admin.id);
  billing = await cookieFor(T.billing.id);
  other = await cookieFor(O.admin.id);
});
afterAll(() => new Promise<void>((r) => server.close(() => r())));

const stored = () => countDatasetChunks({ organizationId: T.org.id });

describe("upload: happy paths", () => {
  const claims = [1200.5, 830, 4000, 95.25, 2210];
  const cases: { name: string; body: string; fields: Record<string, string>; values: number[]; format: string; weightKind: string; n: number }[] = [
    {
      name: "CSV with a header, column chosen",
      body: `claim_id,loss,region\n${claims.map((v, i) => `H-${i},${v},north`).join("\n")}\n`,
      fields: { name: "Windscreen claims", column: "loss", fileName: "claims.csv" },
      values: claims,
      format: "csv",
      weightKind: "none",
      n: 5,
    },
    { name: "TSV", body: `part\tdeviation_um\nK1\t-1.5\nK2\t0.25\nK3\t2\n`, fields: { name: "Bolt deviations", format: "tsv", column: "deviation_um" }, values: [-1.5, 0.25, 2], format: "tsv", weightKind: "none", n: 3 },
    { name: "plain list", body: "310\n275\n\n1280\n", fields: { name: "Plain claims" }, values: [310, 275, 1280], format: "list", weightKind: "none", n: 3 },
    {
      name: "frequency table",
      body: "claims,policies\n0,812\n1,143\n2,38\n3,7\n",
      fields: { name: "Claim counts", column: "claims", weights: "policies" },
      values: [0, 1, 2, 3],
      format: "csv",
      weightKind: "counts",
      n: 1000,
    },
  ];
  for (const c of cases) {
    it(c.name, async () => {
      const res = await upload(server, dev, c.body, c.fields);
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      const v = res.body.version;
      expect(res.body.dataset).toMatchObject({ name: c.fields.name, latestVersion: 1 });
      expect(res.body.dataset.id).toMatch(/^ds_[0-9a-z]{16}$/);
      expect(v).toMatchObject({ version: 1, rows: c.values.length, format: c.format, weightKind: c.weightKind, fileBytes: Buffer.byteLength(c.body) });
      expect(v.summary.n).toBe(c.n);
      if (c.weightKind === "none") {
        near(`${c.name}: mean (jStat.mean)`, v.summary.mean, jStat.mean(c.values), 1e-12);
        if (c.values.length > 1) near(`${c.name}: sd (jStat.stdev(x, true))`, v.summary.sd, jStat.stdev(c.values, true), 1e-12);
        near(`${c.name}: median type 7 (jStat.quantiles(x, [0.5], 1, 1))`, v.summary.median, jStat.quantiles(c.values, [0.5], 1, 1)[0], 1e-12);
      }
      expect(v.histogram.counts.reduce((a: number, b: number) => a + b, 0)).toBe(c.n);
      // The raw file is kept byte for byte, with its SHA-256.
      const rawRes = await request(server).get(`/api/portal/datasets/${res.body.dataset.id}/versions/1/raw`).set("cookie", dev).buffer(true).parse((r, cb) => {
        const parts: Buffer[] = [];
        r.on("data", (d: Buffer) => parts.push(d));
        r.on("end", () => cb(null, Buffer.concat(parts)));
      });
      expect(rawRes.status).toBe(200);
      expect((rawRes.body as Buffer).toString("utf8")).toBe(c.body);
      expect(v.fileSha256).toBe(createHash("sha256").update(c.body).digest("hex"));
    });
  }

  it("skips bad rows when asked and stores the note", async () => {
    const res = await upload(server, dev, "v\n1\nn/a\n3\n", { name: "With gaps", onInvalid: "skip" });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.version).toMatchObject({ rows: 2, skippedRows: 1 });
    expect(res.body.version.notes.join(" ")).toMatch(/1 row skipped: 1 whose value is not a number \(first on line 3, column 1\)/);
  });

  it("lists the organisation's datasets; another organisation sees none of them", async () => {
    const mine = await request(server).get("/api/portal/datasets").set("cookie", billing);
    expect(mine.status).toBe(200);
    expect(mine.body.datasets.map((d: { name: string }) => d.name)).toContain("Windscreen claims");
    expect(mine.body.canUpload).toBe(false);
    const theirs = await request(server).get("/api/portal/datasets").set("cookie", other);
    expect(theirs.body.datasets.map((d: { name: string }) => d.name)).not.toContain("Windscreen claims");
  });

  it("reports the server-side progress of an upload under its id", async () => {
    const res = await upload(server, dev, "1\n2\n3\n", { name: "Tracked", uploadId: "track-0001" });
    expect(res.status).toBe(201);
    const p = await request(server).get("/api/portal/datasets/uploads/track-0001").set("cookie", dev);
    expect(p.body).toEqual({ phase: "done", bytesRead: 6, totalBytes: 6, rows: 3 });
    // someone else's upload id is not theirs to see
    expect((await request(server).get("/api/portal/datasets/uploads/track-0001").set("cookie", admin)).status).toBe(404);
  });
});

describe("upload: bad files answer with a message and store nothing", () => {
  const cases: { name: string; body: string | Buffer; fields: Record<string, string>; status: number; message: RegExp; problem: Record<string, unknown> }[] = [
    { name: "empty file", body: "", fields: { name: "x" }, status: 422, message: /The file is empty/, problem: { code: "empty" } },
    {
      name: "non-numeric cell",
      body: "id,loss\n1,10\n2,ten\n3,n/a\n",
      fields: { name: "x", column: "loss" },
      status: 422,
      message: /^Line 3, column 2 \("loss"\) holds "ten", which is not a number\. In all, 2 rows cannot be read/,
      problem: { code: "bad_values", line: 3, column: 2, value: "ten", counts: { non_numeric: 2 } },
    },
    { name: "header only", body: "id,loss\n", fields: { name: "x", column: "loss" }, status: 422, message: /header row .* but no data rows/, problem: { code: "no_data", line: 2 } },
    { name: "wrong delimiter chosen", body: "a;b\n1;2\n", fields: { name: "x", format: "tsv", column: "b" }, status: 422, message: /You chose tab .* split by semicolon/, problem: { code: "wrong_delimiter" } },
    { name: "delimiter guess contradicted", body: "a,b\n1,2\n3,4,5\n", fields: { name: "x", column: "b" }, status: 422, message: /^Line 3 has 3 fields where the header has 2/, problem: { code: "wrong_delimiter", line: 3 } },
    { name: "unknown column", body: "a,b\n1,2\n", fields: { name: "x", column: "loss" }, status: 422, message: /No column "loss"/, problem: { code: "column_not_found" } },
    { name: "spreadsheet", body: Buffer.from([0x50, 0x4b, 0x03, 0x04, 0, 0, 0]), fields: { name: "x" }, status: 422, message: /not a text file/, problem: { code: "binary" } },
  ];
  for (const c of cases) {
    it(c.name, async () => {
      const before = await stored();
      const res = await upload(server, dev, c.body, c.fields);
      expect(res.status, JSON.stringify(res.body)).toBe(c.status);
      expect(res.body.error).toMatch(c.message);
      expect(res.body.problem).toMatchObject(c.problem);
      expect(await stored()).toEqual(before);
    });
  }

  it(`answers 503 with Retry-After while ${MAX_CONCURRENT_UPLOADS} uploads are being read`, async () => {
    const g = globalThis as unknown as { __sumfoldActiveUploads?: { n: number } };
    g.__sumfoldActiveUploads ??= { n: 0 };
    const was = g.__sumfoldActiveUploads.n;
    g.__sumfoldActiveUploads.n = MAX_CONCURRENT_UPLOADS;
    try {
      const res = await upload(server, dev, "1\n", { name: "busy" });
      expect(res.status).toBe(503);
      expect(res.headers["retry-after"]).toBe("30");
    } finally {
      g.__sumfoldActiveUploads.n = was;
    }
    expect((await upload(server, dev, "1\n", { name: "not busy" })).status).toBe(201);
  });

  it("a missing name is a field error", async () => {
    const res = await upload(server, dev, "1\n", {});
    expect(res.status).toBe(422);
    expect(res.body.fields.name).toMatch(/Name the dataset/);
  });

  it(`refuses a body over ${MAX_UPLOAD_BYTES / 1048576} MiB by its Content-Length (413), storing nothing`, async () => {
    const before = await stored();
    const big = Buffer.alloc(MAX_UPLOAD_BYTES + 2, "1\n");
    const res = await upload(server, dev, big, { name: "too big" });
    expect(res.status).toBe(413);
    expect(res.body.error).toMatch(/the upload limit is 50\.0 MiB/);
    expect(await stored()).toEqual(before);
  });

  it("stops a streamed body without Content-Length at the limit (413), storing nothing", async () => {
    const before = await stored();
    // rows of ~1 KiB each, so the byte limit comes long before the 10^6-value limit
    const piece = Buffer.alloc(1024 * 1024, `7,${"x".repeat(1021)}\n`);
    let sent = 0;
    const body = new ReadableStream<Uint8Array>({
      start(ctrl) {
        ctrl.enqueue(Buffer.from("v,note\n"));
      },
      pull(ctrl) {
        if (sent > MAX_UPLOAD_BYTES + 4 * piece.length) return ctrl.close();
        sent += piece.length;
        ctrl.enqueue(piece);
      },
    });
    const req = new Request("http://127.0.0.1/api/portal/datasets?name=stream&column=v", { method: "POST", headers: { cookie: dev, "content-type": "text/plain" }, body, duplex: "half" } as RequestInit);
    const res = await list.POST(req, { params: Promise.resolve({}) });
    expect(res.status).toBe(413);
    expect(((await res.json()) as { error: string }).error).toMatch(/larger than 50\.0 MiB/);
    expect(sent).toBeLessThanOrEqual(MAX_UPLOAD_BYTES + 2 * piece.length);
    expect(await stored()).toEqual(before);
  });
});

describe("changes: versions, rename, delete, roles and organisations", () => {
  let id: string;
  beforeAll(async () => {
    const res = await upload(server, dev, "v\n1\n2\n", { name: "Versioned", description: "first cut" });
    id = res.body.dataset.id;
  });

  it("a new upload is a new version; the first stays as it was", async () => {
    const res = await upload(server, dev, "v\n5\n6\n7\n", {}, `/api/portal/datasets/${id}/versions`);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.version).toMatchObject({ version: 2, rows: 3 });
    const d = await request(server).get(`/api/portal/datasets/${id}`).set("cookie", dev);
    expect(d.body.dataset).toMatchObject({ latestVersion: 2, ownedByYou: true, canChange: true });
    expect(d.body.versions.map((v: { version: number; rows: number }) => [v.version, v.rows])).toEqual([[2, 3], [1, 2]]);
  });

  it("billing may not upload; a colleague who is not the owner may not change it; an admin may", async () => {
    expect((await upload(server, billing, "1\n", { name: "b" })).status).toBe(403);
    const adminUpload = await upload(server, admin, "9\n", { name: "Admin's" });
    const adminsId = adminUpload.body.dataset.id;
    expect((await request(server).patch(`/api/portal/datasets/${adminsId}`).set("cookie", dev).send({ name: "hijack" })).status).toBe(403);
    expect((await request(server).delete(`/api/portal/datasets/${adminsId}`).set("cookie", dev)).status).toBe(403);
    expect((await upload(server, dev, "1\n", {}, `/api/portal/datasets/${adminsId}/versions`)).status).toBe(403);
    const renamed = await request(server).patch(`/api/portal/datasets/${id}`).set("cookie", admin).send({ name: "Versioned (renamed)", description: "second look" });
    expect(renamed.status, JSON.stringify(renamed.body)).toBe(200);
    expect(renamed.body.dataset).toMatchObject({ name: "Versioned (renamed)", description: "second look", latestVersion: 2 });
  });

  it("another organisation's dataset answers 404 on every route", async () => {
    expect((await request(server).get(`/api/portal/datasets/${id}`).set("cookie", other)).status).toBe(404);
    expect((await request(server).patch(`/api/portal/datasets/${id}`).set("cookie", other).send({ name: "x" })).status).toBe(404);
    expect((await request(server).delete(`/api/portal/datasets/${id}`).set("cookie", other)).status).toBe(404);
    expect((await request(server).get(`/api/portal/datasets/${id}/versions/1/raw`).set("cookie", other)).status).toBe(404);
    expect((await upload(server, other, "1\n", {}, `/api/portal/datasets/${id}/versions`)).status).toBe(404);
  });

  it("the owner deletes it with all versions and payloads", async () => {
    const res = await request(server).delete(`/api/portal/datasets/${id}`).set("cookie", dev);
    expect(res.status).toBe(200);
    expect((await request(server).get(`/api/portal/datasets/${id}`).set("cookie", dev)).status).toBe(404);
  });
});
