// A local stand-in for the hosted Redis REST service that @upstash/redis (and so @upstash/ratelimit) talks to.
// It speaks the REST protocol the client uses: POST / with one command, POST /pipeline and /multi-exec with
// a list of commands, Bearer token auth, and `Upstash-Encoding: base64` responses; commands run on a private
// redis-server. Redis 7.0 rejects the `#!lua flags=...` shebang of newer scripts, so it is stripped and the
// client's script hash is mapped to the hash of the stripped text.
import { createHash, timingSafeEqual } from "node:crypto";
import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";
import { Redis } from "ioredis";

export interface RedisRestOptions {
  port: number;
  token: string;
  redisPort: number;
}

type Reply = Buffer | number | null | Reply[] | string;

const sha1 = (s: string) => createHash("sha1").update(s).digest("hex");
const stripShebang = (script: string) => script.replace(/^#!lua[^\n]*\n/, "");

function encode(value: Reply, base64: boolean): unknown {
  if (Buffer.isBuffer(value)) return base64 ? value.toString("base64") : value.toString("utf8");
  if (typeof value === "string") return base64 ? Buffer.from(value).toString("base64") : value;
  if (Array.isArray(value)) return value.map((v) => encode(v, base64));
  return value;
}

export function startRedisRest(opts: RedisRestOptions): Promise<Server> {
  const redis = new Redis({ host: "127.0.0.1", port: opts.redisPort, lazyConnect: false, maxRetriesPerRequest: 1, enableOfflineQueue: false });
  redis.on("error", () => {
    /* surfaced per request */
  });
  const scriptMap = new Map<string, string>();
  const expected = Buffer.from(`Bearer ${opts.token}`);

  async function run(cmd: unknown[]): Promise<Reply> {
    if (!Array.isArray(cmd) || cmd.length === 0) throw new Error("ERR empty command");
    const args = cmd.map((a) => (typeof a === "string" ? a : JSON.stringify(a)));
    const name = args[0].toLowerCase();
    if (name === "eval" && args[1] !== undefined) {
      const stripped = stripShebang(args[1]);
      if (stripped !== args[1]) scriptMap.set(sha1(args[1]), sha1(stripped));
      args[1] = stripped;
    } else if (name === "evalsha" && args[1] !== undefined) {
      args[1] = scriptMap.get(args[1].toLowerCase()) ?? args[1];
    } else if (name === "script" && args[1]?.toLowerCase() === "load" && args[2] !== undefined) {
      const original = args[2];
      const realSha = (await redis.callBuffer("script", "load", stripShebang(original))) as Buffer;
      scriptMap.set(sha1(original), realSha.toString());
      return sha1(original);
    }
    return (await redis.callBuffer(args[0], ...args.slice(1))) as Reply;
  }

  async function readBody(req: IncomingMessage): Promise<unknown> {
    const chunks: Buffer[] = [];
    for await (const c of req) chunks.push(c as Buffer);
    const text = Buffer.concat(chunks).toString("utf8");
    return text ? JSON.parse(text) : null;
  }

  function send(res: ServerResponse, status: number, body: unknown) {
    res.writeHead(status, { "content-type": "application/json" });
    res.end(JSON.stringify(body));
  }

  const server = createServer(async (req, res) => {
    const auth = Buffer.from(req.headers.authorization ?? "");
    if (auth.length !== expected.length || !timingSafeEqual(auth, expected)) {
      return send(res, 401, { error: "Unauthorized" });
    }
    const base64 = String(req.headers["upstash-encoding"] ?? "").toLowerCase() === "base64";
    const url = new URL(req.url ?? "/", "http://127.0.0.1");
    try {
      if (url.pathname === "/pipeline" || url.pathname === "/multi-exec") {
        const cmds = (await readBody(req)) as unknown[][];
        if (!Array.isArray(cmds)) return send(res, 400, { error: "ERR body must be an array of commands" });
        if (url.pathname === "/multi-exec") {
          const results = (await redis.multi(cmds.map((c) => c.map(String))).exec()) ?? [];
          return send(
            res,
            200,
            results.map(([err, value]) => (err ? { error: err.message } : { result: encode(value as Reply, base64) })),
          );
        }
        const out: unknown[] = [];
        for (const c of cmds) {
          try {
            out.push({ result: encode(await run(c), base64) });
          } catch (e) {
            out.push({ error: (e as Error).message });
          }
        }
        return send(res, 200, out);
      }
      let cmd: unknown[];
      if (req.method === "POST" && url.pathname === "/") cmd = (await readBody(req)) as unknown[];
      else cmd = url.pathname.split("/").filter(Boolean).map(decodeURIComponent);
      return send(res, 200, { result: encode(await run(cmd), base64) });
    } catch (e) {
      const msg = (e as Error).message;
      const unreachable = /Connection|ECONNREFUSED|offline|closed/i.test(msg);
      return send(res, unreachable ? 503 : 400, { error: msg });
    }
  });
  server.on("close", () => redis.disconnect());
  return new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, "127.0.0.1", () => resolve(server));
  });
}
