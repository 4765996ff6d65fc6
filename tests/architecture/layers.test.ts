// Data flows one way: app/ (routes, pages) may import lib/, never the reverse. A regression here is a file
// under lib/ that reaches into a route or page module.
import { describe, expect, it } from "vitest";
import { importsOf, sourceFiles } from "./imports";

describe("layering", () => {
  it("finds the files it checks (the scan is not vacuous)", () => {
    const files = sourceFiles("lib");
    expect(files.length).toBeGreaterThan(100);
    // The scanner sees both alias and relative imports.
    expect(importsOf("lib/api/gate.ts").some((i) => i.target === "lib/api/errors")).toBe(true);
    expect(importsOf("lib/api/gate.ts").some((i) => i.target === "lib/db/keys")).toBe(true);
  });

  it("no file under lib/ imports from app/", () => {
    const offences = sourceFiles("lib").flatMap((f) =>
      importsOf(f)
        .filter((i) => i.target !== null && (i.target === "app" || i.target.startsWith("app/")))
        .map((i) => `${f} imports ${i.specifier}`),
    );
    expect(offences).toEqual([]);
  });
});
