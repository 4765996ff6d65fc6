import { FAMILY_NAMES, FAMILY_SPECS, type ParamSpec } from "@/lib/cf/families/spec";

const bound = (v: number) => (v === Infinity ? "inf" : v === -Infinity ? "-inf" : String(v));

function range(p: ParamSpec): string {
  if (p.values) return p.values.map((v) => `"${v}"`).join(" | ");
  const interval = `${p.loOpen ? "(" : "["}${bound(p.lo)}, ${bound(p.hi)}${p.hiOpen ? ")" : "]"}`;
  return p.type === "int" ? `integer in ${interval}` : interval;
}

/** The family catalogue as the API serves it (GET /api/v1/families) and the docs show it. */
export function catalogueResponse() {
  return {
    families: FAMILY_NAMES.map((name) => {
      const f = FAMILY_SPECS[name];
      return {
        family: name,
        title: f.title,
        parameters: f.params.map((p) => ({ name: p.name, description: p.doc, range: range(p), ...(p.default !== undefined ? { default: p.default } : {}) })),
        support: f.support,
        kind: f.discrete ? "lattice" : "continuous",
        cf: f.cf,
        cfMethod: f.cfMethod,
        moments: f.moments,
        momentExistence: f.momentExistence ?? "all",
        tailIndex: f.tailIndex ?? "none",
        source: f.source,
      };
    }),
  };
}
