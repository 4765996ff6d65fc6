import type { Metadata } from "next";
import { Caution } from "@/app/_components/caution";
import { FAMILY_SPECS, type FamilyName } from "@/lib/cf/families/spec";
import { Explorer } from "./explorer";
import type { BuilderFamily } from "./model-builder";

export const metadata: Metadata = { title: "Explorer" };

// The families offered by the form; anything else is written in the JSON editor.
const COMMON: FamilyName[] = ["normal", "uniform", "gamma", "exponential", "lognormal", "poisson", "binomial", "student_t"];

const builderFamilies: BuilderFamily[] = COMMON.map((name) => ({
  name,
  title: FAMILY_SPECS[name].title,
  params: FAMILY_SPECS[name].params.filter((p) => !p.values).map((p) => ({ name: p.name, doc: p.doc, start: p.default !== undefined ? String(p.default) : "1" })),
}));

export default function ExplorerPage() {
  return (
    <div className="space-y-6">
      <Caution />
      <Explorer builderFamilies={builderFamilies} />
    </div>
  );
}
