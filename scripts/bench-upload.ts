// `npx tsx --conditions=react-server scripts/bench-upload.ts [--server]`: peak memory
// of one 50 MiB dataset upload (10^6 values, the largest file the limits allow) on private services.
// Default: the portal's upload route handler in this process, body streamed in 64 KiB pieces. --server: the
// same upload over HTTP to `next start` (the production server), memory read from the server's /proc.
// Peak RSS is the kernel's VmHWM after resetting it (echo 5 > /proc/PID/clear_refs) just before the upload.
import { readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { resolve } from "node:path";
import { parseArgs } from "node:util";
import { testLayout, type Secrets } from "./lib/config";
import { buildIsStale, log, runBuild, startNext, startServices, stopChild } from "./lib/stack";

const { values: args } = parseArgs({ options: { server: { type: "boolean", default: false }, mib: { type: "string", default: "50" } } });
process.env.SUMFOLD_TEST_PORT_OFFSET ??= "2500";
const root = resolve("/dev/shm", `sumfold-bench-upload-${process.pid}`);
const layout = testLayout(root);
const secrets: Secrets = { NEXTAUTH_SECRET: "bench-upload", SUMFOLD_KEY_PEPPER: "bench-pepper", DB_PASSWORD: layout.db.password, UPSTASH_REDIS_REST_TOKEN: "bench-token", STRIPE_SECRET_KEY: "sk_test_bench", STRIPE_WEBHOOK_SECRET: "whsec_bench" };
const MiB = 1024 * 1024;
const mb = (n: number) => `${(n / MiB).toFixed(1)} MiB`;

/** Rows of exactly `rowBytes` bytes: claim id, date, amount, padded note; n rows. */
function fileStream(rows: number, rowBytes: number, onBytes: (n: number) => void): ReadableStream<Uint8Array> {
  const header = Buffer.from("claim_id,settled_on,amount_eur,note\n");
  let i = 0;
  let s = 2463534242;
  let sentHeader = false;
  return new ReadableStream<Uint8Array>({
    pull(ctrl) {
      if (!sentHeader) {
        sentHeader = true;
        onBytes(header.length);
        return ctrl.enqueue(header);
      }
      if (i >= rows) return ctrl.close();
      const n = Math.min(rows - i, Math.floor((64 * 1024) / rowBytes));
      const buf = Buffer.alloc(n * rowBytes, " ");
      for (let k = 0; k < n; k++, i++) {
        s ^= s << 13;
        s ^= s >>> 17;
        s ^= s << 5;
        const amount = (((s >>> 0) % 5_000_000) / 100 + 50).toFixed(2);
        const head = `HM-${String(1_000_000 + i)},2025-06-${String(1 + (i % 28)).padStart(2, "0")},${amount},`;
        buf.write(head, k * rowBytes);
        buf.write("\n", (k + 1) * rowBytes - 1);
      }
      onBytes(buf.length);
      ctrl.enqueue(buf);
    },
  });
}

const status = (pid: number) => readFileSync(`/proc/${pid}/status`, "utf8");
const kib = (text: string, field: string) => Number(new RegExp(`${field}:\\s+(\\d+) kB`).exec(text)?.[1] ?? 0) * 1024;
function tree(pid: number): number[] {
  const out = [pid];
  for (const t of readdirSync(`/proc/${pid}/task`)) {
    const kids = readFileSync(`/proc/${pid}/task/${t}/children`, "utf8").trim();
    if (kids) for (const k of kids.split(/\s+/)) out.push(...tree(Number(k)));
  }
  return out;
}

const services = await startServices(layout, secrets);
let server: Awaited<ReturnType<typeof startNext>> | null = null;
try {
  Object.assign(process.env, services.env, { NEXTAUTH_SECRET: secrets.NEXTAUTH_SECRET });
  const { getDb, getPool } = await import("../lib/db/client");
  const { organizations, users, memberships } = await import("../lib/db/schema");
  const { encode } = await import("next-auth/jwt");
  const [o] = await getDb().insert(organizations).values({ slug: `bench-${Date.now()}`, name: "Harrowgate Mutual (bench)", plan: "scale" });
  const [u] = await getDb().insert(users).values({ email: `bench.${Date.now()}@bench.example`, name: "Bench", passwordHash: "x", emailVerifiedAt: new Date() });
  await getDb().insert(memberships).values({ userId: u.insertId, organizationId: o.insertId, role: "developer" });
  const { openSession } = await import("../lib/auth/sessions");
  const { sid, sv } = await openSession({ userId: u.insertId, ip: "127.0.0.1", userAgent: "bench", method: "password" });
  const cookie = `next-auth.session-token=${await encode({ token: { uid: u.insertId, email: "", name: "", sid, sv }, secret: secrets.NEXTAUTH_SECRET })}`;

  const target = Number(args.mib) * MiB;
  const rows = 1_000_000;
  const rowBytes = Math.floor((target - 64) / rows);
  const uploadId = `bench_${Date.now()}`;
  const query = `name=Bench%20claims&column=amount_eur&fileName=bench.csv&uploadId=${uploadId}`;
  let sent = 0;
  const body = () => fileStream(rows, rowBytes, (n) => (sent += n));

  let pids: number[];
  let call: () => Promise<Response>;
  if (args.server) {
    if (buildIsStale()) await runBuild(services.env);
    server = await startNext(layout, services.env, "ignore");
    pids = tree(server.pid!);
    const url = `http://127.0.0.1:${layout.appPort}/api/portal/datasets?${query}`;
    call = () => fetch(url, { method: "POST", headers: { cookie, "content-type": "text/csv" }, body: body(), duplex: "half" } as RequestInit);
    // warm the route (compiles and loads its modules) with a small file
    await fetch(`http://127.0.0.1:${layout.appPort}/api/portal/datasets?name=warm`, { method: "POST", headers: { cookie, "content-type": "text/csv" }, body: "1\n2\n" });
  } else {
    const { POST } = await import("../app/api/portal/datasets/route");
    pids = [process.pid];
    call = () => POST(new Request(`http://127.0.0.1/api/portal/datasets?${query}`, { method: "POST", headers: { cookie, "content-type": "text/csv" }, body: body(), duplex: "half" } as RequestInit), { params: Promise.resolve({}) });
    await POST(new Request("http://127.0.0.1/api/portal/datasets?name=warm", { method: "POST", headers: { cookie, "content-type": "text/csv" }, body: "1\n2\n" }), { params: Promise.resolve({}) });
  }
  (globalThis as { gc?: () => void }).gc?.();
  const rssNow = () => pids.reduce((s, p) => s + kib(status(p), "VmRSS"), 0);
  const baseline = rssNow();
  for (const p of pids) writeFileSync(`/proc/${p}/clear_refs`, "5");
  let sampledPeak = baseline;
  let heapPeak = 0;
  let buffersPeak = 0;
  const timer = setInterval(() => {
    sampledPeak = Math.max(sampledPeak, rssNow());
    if (!args.server) {
      const m = process.memoryUsage();
      heapPeak = Math.max(heapPeak, m.heapUsed);
      buffersPeak = Math.max(buffersPeak, m.arrayBuffers);
    }
  }, 10);
  // When the parse ends and storing starts, from the upload's progress (in-process table or the portal endpoint).
  // Also when the parser first reports bytes, and how much the client had sent by then (streaming, not buffering).
  let parsedAt = 0;
  let firstRead: { at: number; sent: number; read: number } | null = null;
  type P = { phase: string; bytesRead: number };
  const phase = async (): Promise<P | undefined> => {
    if (!args.server) return (globalThis as { __sumfoldUploads?: Map<string, P> }).__sumfoldUploads?.get(uploadId);
    const r = await fetch(`http://127.0.0.1:${layout.appPort}/api/portal/datasets/uploads/${uploadId}`, { headers: { cookie } }).catch(() => null);
    return r && r.ok ? ((await r.json()) as P) : undefined;
  };
  const phaseTimer = setInterval(() => {
    const sentNow = sent;
    void phase().then((p) => {
      if (!p) return;
      if (!firstRead && p.bytesRead > 0) firstRead = { at: performance.now(), sent: sentNow, read: p.bytesRead };
      if (!parsedAt && (p.phase === "storing" || p.phase === "done")) parsedAt = performance.now();
    });
  }, 50);
  const t0 = performance.now();
  const res = await call();
  const answer = (await res.json()) as { version?: { rows: number; fileBytes: number; summary: { mean: number } }; error?: string };
  const seconds = (performance.now() - t0) / 1000;
  clearInterval(timer);
  clearInterval(phaseTimer);
  const hwm = Math.max(...pids.map((p) => kib(status(p), "VmHWM")));
  const [stored] = (await getPool().query(
    "SELECT c.kind, COUNT(*) AS chunks, SUM(LENGTH(c.bytes)) AS bytes FROM dataset_chunks c JOIN dataset_versions v ON v.id = c.version_id JOIN datasets d ON d.id = v.dataset_id WHERE d.organization_id = ? AND d.name = 'Bench claims' GROUP BY c.kind",
    [o.insertId],
  )) as unknown as [{ kind: string; chunks: number; bytes: string }[]];
  await getPool().end();

  console.log(`\nupload of ${mb(sent)} (${sent.toLocaleString("en")} bytes, ${rows.toLocaleString("en")} values of ${rowBytes} bytes per row), ${args.server ? "over HTTP to next start" : "to the route handler in this process"}`);
  console.log(`status ${res.status}; ${answer.version ? `stored ${answer.version.rows.toLocaleString("en")} values, file ${answer.version.fileBytes.toLocaleString("en")} bytes` : `error: ${answer.error}`}`);
  console.log(`time ${seconds.toFixed(2)} s (${(sent / MiB / seconds).toFixed(1)} MiB/s): receive + parse + summary ${parsedAt ? ((parsedAt - t0) / 1000).toFixed(2) : "?"} s, store ${parsedAt ? ((t0 + seconds * 1000 - parsedAt) / 1000).toFixed(2) : "?"} s (50 ms resolution)`);
  const fr = firstRead as { at: number; sent: number; read: number } | null;
  if (fr) console.log(`first progress from the parser after ${((fr.at - t0) / 1000).toFixed(2)} s: ${mb(fr.read)} read while the client had produced ${mb(fr.sent)} of ${mb(sent)}`);
  console.log(`RSS before ${mb(baseline)}; peak (VmHWM) ${mb(hwm)}; peak above baseline ${mb(hwm - baseline)}; sampled every 10 ms: ${mb(sampledPeak)}`);
  if (!args.server) console.log(`peak V8 heap used ${mb(heapPeak)}; peak ArrayBuffer/Buffer memory ${mb(buffersPeak)}`);
  for (const r of stored) console.log(`stored chunks: ${r.kind.padEnd(7)} ${String(r.chunks).padStart(3)} rows, ${mb(Number(r.bytes))}`);
} finally {
  await stopChild(server);
  await services.stop();
  rmSync(root, { recursive: true, force: true });
  log("benchmark services stopped");
}
