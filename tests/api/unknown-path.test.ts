// A path under /api/v1 that no route serves answers 404 problem+json (RFC 9457), as /docs/errors says of every error,
// never the site's HTML page; a mistyped endpoint is named with the one it is near.
import { readdirSync } from "node:fs";
import { resolve } from "node:path";
import { describe, expect, it } from "vitest";
import * as unknown from "@/app/api/v1/[...path]/route";
import { API_V1_NAMES } from "@/lib/api/unknown-path";

const v1 = resolve(import.meta.dirname, "../../app/api/v1");
const call = async (method: "GET" | "POST", path: string[]) => {
  const res = await unknown[method](new Request(`http://127.0.0.1/api/v1/${path.join("/")}`, { method, ...(method === "POST" ? { body: "{}" } : {}) }), { params: Promise.resolve({ path }) });
  return { status: res.status, type: res.headers.get("content-type"), body: (await res.json()) as Record<string, unknown> };
};

describe("unknown paths under /api/v1", () => {
  it("lists exactly the endpoints the app serves (the directories under app/api/v1)", () => {
    const dirs = readdirSync(v1, { withFileTypes: true }).filter((d) => d.isDirectory() && !d.name.startsWith("[")).map((d) => d.name);
    expect([...API_V1_NAMES].sort()).toEqual(dirs.sort());
  });

  it("answers 404 problem+json naming the path and the near endpoint", async () => {
    const r = await call("POST", ["quantile"]);
    expect(r.status).toBe(404);
    expect(r.type).toBe("application/problem+json");
    expect(r.body.type).toMatch(/\/docs\/errors#not_found$/);
    expect(r.body.status).toBe(404);
    expect(r.body.instance).toMatch(/^urn:sumfold:request:/);
    expect(r.body.detail).toBe("There is no endpoint POST /api/v1/quantile. Did you mean /api/v1/quantiles? The endpoints are listed at /docs and in /api/v1/openapi.json.");
  });

  it("offers no guess for a path far from every endpoint, and names nested paths whole", async () => {
    const far = await call("GET", ["v2", "everything"]);
    expect(far.status).toBe(404);
    expect(far.body.detail).toBe("There is no endpoint GET /api/v1/v2/everything. The endpoints are listed at /docs and in /api/v1/openapi.json.");
    const nested = await call("POST", ["densty", "x"]);
    expect(nested.body.detail).toMatch(/^There is no endpoint POST \/api\/v1\/densty\/x\. Did you mean \/api\/v1\/density\?/);
  });
});
