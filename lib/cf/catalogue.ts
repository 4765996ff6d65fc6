import { FAMILY_NAMES, FAMILY_SPECS, type FamilyName } from "./families/spec";

export interface CatalogueParam {
  name: string;
  type: "real" | "integer" | "enum";
  /** bounds (null = unbounded); exclusive flags say whether the bound itself is allowed */
  min: number | null;
  max: number | null;
  minExclusive: boolean;
  maxExclusive: boolean;
  default: number | string | null;
  values: string[] | null;
  description: string;
}

export interface CatalogueEntry {
  name: FamilyName;
  title: string;
  parameters: CatalogueParam[];
  support: string;
  discrete: boolean;
  characteristicFunction: string;
  cfMethod: string;
  moments: string;
  /** machine-readable moment existence: "all", "none", or "below:<param>" (orders strictly below that parameter) */
  momentExistence: string;
  /** right-tail index as text ("none": lighter than any power; "bounded": bounded support) */
  tailIndex: string;
  source: string;
}

/** The family catalogue served by GET /api/v1/families (plain JSON: no Infinity, no functions). */
export function familyCatalogue(): CatalogueEntry[] {
  return FAMILY_NAMES.map((name) => {
    const s = FAMILY_SPECS[name];
    return {
      name,
      title: s.title,
      parameters: s.params.map((p) => ({
        name: p.name,
        type: p.values ? "enum" : p.type === "int" ? "integer" : "real",
        min: p.values || p.lo === -Infinity ? null : p.lo,
        max: p.values || p.hi === Infinity ? null : p.hi,
        minExclusive: p.values || p.lo === -Infinity ? false : p.loOpen,
        maxExclusive: p.values || p.hi === Infinity ? false : p.hiOpen,
        default: p.default ?? null,
        values: p.values ? [...p.values] : null,
        description: p.doc,
      })),
      support: s.support,
      discrete: s.discrete,
      characteristicFunction: s.cf,
      cfMethod: s.cfMethod,
      moments: s.moments,
      momentExistence: s.momentExistence ?? "all",
      tailIndex: s.tailIndex ?? "none",
      source: s.source,
    };
  });
}

export { FAMILY_NAMES };
