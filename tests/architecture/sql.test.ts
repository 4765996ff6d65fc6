// SQL lives in lib/db: outside it no file imports drizzle's query builders, the database client (getDb, getPool)
// or the table objects; types of rows, and the request deadline helper, may be imported.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { ROOT, sourceFiles, targetOf } from "./imports";

const CLIENT_ALLOWED = new Set(["withDbDeadline", "DbUnavailableError", "DB_DEADLINE_MS"]);

// `import { a, type B, c as d } from "x"` / `import type { ... } from "x"` / `import * as ns from "x"` / `import("x")`
const IMPORT = /(?:^|\n)\s*import\s+(type\s+)?([^;]*?)\s+from\s+["']([^"']+)["']|\bimport\(\s*["']([^"']+)["']\s*\)/g;

function valueNames(clause: string): string[] {
  const braces = /\{([^}]*)\}/.exec(clause);
  const names = braces ? braces[1].split(",").map((s) => s.trim()).filter((s) => s && !s.startsWith("type ")) : [];
  const rest = clause.replace(/\{[^}]*\}/, "").replace(/,/g, " ").trim();
  if (rest) names.push(rest.startsWith("*") ? "*" : "default");
  return names.map((n) => n.split(/\s+as\s+/)[0]);
}

/** What a file imports that only lib/db may import. */
export function sqlImports(file: string): string[] {
  const text = readFileSync(join(ROOT, file), "utf8");
  const out: string[] = [];
  for (const m of text.matchAll(IMPORT)) {
    const spec = m[3] ?? m[4];
    if (/^drizzle-orm(\/|$)/.test(spec)) {
      if (!m[1] || m[4]) out.push(`${spec}`);
      continue;
    }
    const db = /^lib\/db\/(client|schema|schema-billing|schema-datasets)$/.exec(targetOf(file, spec) ?? "");
    if (!db) continue;
    if (m[4]) {
      out.push(`import("${spec}")`);
      continue;
    }
    if (m[1]) continue; // import type { ... }
    const bad = valueNames(m[2]).filter((n) => db[1] !== "client" || !CLIENT_ALLOWED.has(n));
    if (bad.length) out.push(`${bad.join(", ")} from ${spec}`);
  }
  return out;
}

describe("SQL only in lib/db", () => {
  it("the check sees query builders, the client and tables", () => {
    // lib/db files do import them (the scan is not vacuous).
    expect(sqlImports("lib/db/keys.ts").some((s) => s.startsWith("drizzle-orm"))).toBe(true);
    expect(sqlImports("lib/db/keys.ts").some((s) => s.includes("getDb"))).toBe(true);
    expect(sqlImports("lib/db/keys.ts").some((s) => s.includes("apiKeys"))).toBe(true);
  });

  it("no file in app/ or lib/ outside lib/db imports drizzle, the client or the tables", () => {
    const files = [...sourceFiles("app"), ...sourceFiles("lib")].filter((f) => !f.startsWith("lib/db/"));
    expect(files.length).toBeGreaterThan(150);
    const offences = files.flatMap((f) => sqlImports(f).map((s) => `${f}: ${s}`));
    expect(offences).toEqual([]);
  });
});
