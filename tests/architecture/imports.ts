import { readdirSync, readFileSync } from "node:fs";
import { dirname, join, relative, resolve } from "node:path";

export const ROOT = resolve(__dirname, "../..");

/** Every .ts/.tsx file below a folder of the repository, as paths relative to the root. */
export function sourceFiles(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of readdirSync(join(ROOT, d), { withFileTypes: true })) {
      const p = join(d, e.name);
      if (e.isDirectory()) {
        if (e.name !== "node_modules" && !e.name.startsWith(".")) walk(p);
      } else if (/\.tsx?$/.test(e.name) && !e.name.endsWith(".d.ts")) out.push(p);
    }
  };
  walk(dir);
  return out.sort();
}

// Static imports and re-exports (`import ... from "x"`, `export ... from "x"`, `import "x"`) and dynamic `import("x")`.
const SPECIFIER = /(?:^|\n)\s*(?:import|export)\s[^;]*?\sfrom\s+["']([^"']+)["']|(?:^|\n)\s*import\s+["']([^"']+)["']|\bimport\(\s*["']([^"']+)["']\s*\)/g;

/** The repository path a specifier names when it is local (`@/x` or relative), else null (a package). */
export function targetOf(file: string, specifier: string): string | null {
  if (specifier.startsWith("@/")) return specifier.slice(2);
  if (specifier.startsWith(".")) return relative(ROOT, resolve(ROOT, dirname(file), specifier));
  return null;
}

/** The module specifiers a file imports, each with the repository path it resolves to when it is local. */
export function importsOf(file: string): { specifier: string; target: string | null }[] {
  const text = readFileSync(join(ROOT, file), "utf8");
  const out: { specifier: string; target: string | null }[] = [];
  for (const m of text.matchAll(SPECIFIER)) {
    const specifier = m[1] ?? m[2] ?? m[3];
    out.push({ specifier, target: targetOf(file, specifier) });
  }
  return out;
}
