import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";

type Handler = (req: Request, ctx: { params: Promise<Record<string, string>> }) => Response | Promise<Response>;
export type RouteModule = Partial<Record<"GET" | "POST" | "PUT" | "PATCH" | "DELETE" | "OPTIONS" | "HEAD", Handler>>;

/**
 * A Node http server that hands each request to App Router route handlers, so supertest can drive them
 * in-process. `routes` maps a path pattern ("/api/v1/datasets/[id]") to its route module.
 */
export function routeServer(routes: Record<string, RouteModule>): Server {
  const table = Object.entries(routes).map(([pattern, mod]) => {
    const names: string[] = [];
    const re = new RegExp(
      "^" + pattern.replace(/\[(\w+)\]/g, (_, n: string) => (names.push(n), "([^/]+)")) + "/?$",
    );
    return { re, names, mod };
  });
  return createServer(async (req: IncomingMessage, res: ServerResponse) => {
    const url = new URL(req.url ?? "/", "http://127.0.0.1");
    const hit = table.map((t) => ({ t, m: t.re.exec(url.pathname) })).find((x) => x.m);
    if (!hit) {
      res.writeHead(404).end();
      return;
    }
    const method = (req.method ?? "GET").toUpperCase() as keyof RouteModule;
    const handler = hit.t.mod[method];
    if (!handler) {
      res.writeHead(405).end();
      return;
    }
    const chunks: Buffer[] = [];
    for await (const c of req) chunks.push(c as Buffer);
    const headers = new Headers();
    for (const [k, v] of Object.entries(req.headers)) {
      if (Array.isArray(v)) v.forEach((x) => headers.append(k, x));
      else if (v !== undefined) headers.set(k, v);
    }
    const body = chunks.length && method !== "GET" && method !== "HEAD" ? Buffer.concat(chunks) : undefined;
    const request = new Request(url, { method, headers, body });
    const params: Record<string, string> = {};
    hit.t.names.forEach((n, i) => (params[n] = decodeURIComponent(hit.m![i + 1])));
    try {
      const response = await handler(request, { params: Promise.resolve(params) });
      const out: Record<string, string[]> = {};
      response.headers.forEach((v, k) => (out[k] = [...(out[k] ?? []), v]));
      res.writeHead(response.status, out);
      res.end(Buffer.from(await response.arrayBuffer()));
    } catch (e) {
      res.writeHead(500, { "content-type": "text/plain" });
      res.end(`handler threw: ${(e as Error).message}`);
    }
  });
}
