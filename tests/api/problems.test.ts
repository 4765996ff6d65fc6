// The docs say what the API does: every problem type the code can raise is in the error table and is listed
// by the operations that can return it, and requests that trigger each one get the documented type.
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { PROBLEMS, type ProblemCode } from "@/lib/api/errors";
import { buildOpenApiDocument } from "@/lib/api/openapi";
import { MAX_GRID_POINTS, MAX_MOMENT_ORDER } from "@/lib/cf/limits";
import { keyedClient } from "../support/api";

const root = resolve(import.meta.dirname, "../..");
const doc = (await buildOpenApiDocument()) as unknown as { paths: Record<string, Record<string, { responses: Record<string, { content?: Record<string, { examples?: Record<string, unknown> }> }> }>> };

/** The problem types an operation documents, from the named examples of its problem responses. */
function documented(path: string, method = "post"): Map<string, string> {
  const out = new Map<string, string>();
  for (const [status, r] of Object.entries(doc.paths[path][method].responses)) {
    for (const c of Object.keys(r.content?.["application/problem+json"]?.examples ?? {})) out.set(c, status);
  }
  return out;
}

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    return statSync(p).isDirectory() ? sources(p) : /\.tsx?$/.test(f) ? [p] : [];
  });
}

describe("problem types in code and docs", () => {
  it("every code the API's source raises is a declared problem, documented on /docs/errors and by at least one operation", () => {
    const raised = new Set<string>();
    for (const f of [...sources(join(root, "lib")), ...sources(join(root, "app/api/v1"))]) {
      for (const m of readFileSync(f, "utf8").matchAll(/new ApiError\(\s*"([a-z_]+)"/g)) raised.add(m[1]);
    }
    // The core's errors are mapped in toApiError; read its targets the same way.
    expect(raised.size).toBeGreaterThan(8);
    const errorsPage = readFileSync(join(root, "app/docs/errors/page.tsx"), "utf8");
    const everywhere = new Set(Object.keys(doc.paths).flatMap((p) => Object.keys(doc.paths[p]).flatMap((m) => [...documented(p, m).keys()])));
    for (const code of raised) {
      expect(Object.keys(PROBLEMS), `${code} is raised but not in PROBLEMS`).toContain(code);
      expect(errorsPage, `${code} has no explanation on /docs/errors`).toMatch(new RegExp(`\\b${code}:`));
      expect([...everywhere], `${code} is raised but no operation documents it`).toContain(code);
    }
  });

  it("each status of an operation documents every type that shares it (422 lists validation, limit_exceeded and not_applicable)", () => {
    const d = documented("/api/v1/density");
    for (const c of ["validation", "limit_exceeded", "not_applicable"]) expect(d.get(c)).toBe("422");
    expect(d.get("rate_limited")).toBe("429");
    expect(d.get("quota_exhausted")).toBe("429");
    expect(d.get("not_found")).toBe("404");
  });
});

describe("requests that trigger a problem get a documented type", () => {
  const { post } = keyedClient();

  const cases: [string, string, unknown, ProblemCode][] = [
    ["grid.count over the limit", "/api/v1/density", { model: { family: "normal", mu: 0, sigma: 1 }, grid: { from: -1, to: 1, count: MAX_GRID_POINTS + 1 } }, "limit_exceeded"],
    [`moment order ${MAX_MOMENT_ORDER + 1}`, "/api/v1/moments", { model: { family: "normal", mu: 0, sigma: 1 }, order: MAX_MOMENT_ORDER + 1 }, "limit_exceeded"],
    ["1001 quantile levels", "/api/v1/quantiles", { model: { family: "normal", mu: 0, sigma: 1 }, p: new Array(1001).fill(0.5) }, "limit_exceeded"],
    ["a limit breach and an unknown field together", "/api/v1/moments", { model: { family: "normal", mu: 0, sigma: 1 }, order: MAX_MOMENT_ORDER + 1, orders: 2 }, "validation"],
    ["cf arguments over the grid limit", "/api/v1/cf", { model: { family: "normal", mu: 0, sigma: 1 }, t: { from: 0, to: 1, count: MAX_GRID_POINTS + 1 } }, "limit_exceeded"],
    ["moment order 0", "/api/v1/moments", { model: { family: "normal", mu: 0, sigma: 1 }, order: 0 }, "validation"],
    ["an unknown dataset in a model", "/api/v1/moments", { model: { compound: { count: { family: "poisson", lambda: 2 }, each: { dataset: "ds_0000000000000000", version: 1 } } } }, "not_found"],
    ["an unknown dataset in a density", "/api/v1/density", { model: { dataset: "ds_0000000000000000" } }, "not_found"],
  ];
  for (const [what, path, body, code] of cases) {
    it(`${what}: ${code}, and ${path} documents it under that status`, async () => {
      const res = await post(path, body);
      expect(res.body.type, JSON.stringify(res.body).slice(0, 400)).toMatch(new RegExp(`/docs/errors#${code}$`));
      expect(res.status).toBe(PROBLEMS[code].status);
      expect(documented(path).get(code)).toBe(String(res.status));
    });
  }
});
