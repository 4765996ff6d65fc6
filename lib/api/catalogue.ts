import { familyCatalogue, type CatalogueParam } from "@/lib/cf/catalogue";

const bound = (v: number | null, inf: string) => (v === null ? inf : String(v));

function range(p: CatalogueParam): string {
  if (p.values) return p.values.map((v) => `"${v}"`).join(" | ");
  const interval = `${p.minExclusive || p.min === null ? "(" : "["}${bound(p.min, "-inf")}, ${bound(p.max, "inf")}${p.maxExclusive || p.max === null ? ")" : "]"}`;
  return p.type === "integer" ? `integer in ${interval}` : interval;
}

/** The family catalogue (lib/cf/catalogue.ts) as the API serves it (GET /api/v1/families) and the docs show it. */
export function catalogueResponse() {
  return {
    families: familyCatalogue().map((f) => ({
      family: f.name,
      title: f.title,
      parameters: f.parameters.map((p) => ({ name: p.name, description: p.description, range: range(p), ...(p.default !== null ? { default: p.default } : {}) })),
      support: f.support,
      kind: f.discrete ? "lattice" : "continuous",
      cf: f.characteristicFunction,
      cfMethod: f.cfMethod,
      moments: f.moments,
      momentExistence: f.momentExistence,
      tailIndex: f.tailIndex,
      source: f.source,
    })),
  };
}
