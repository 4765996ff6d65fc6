// The bound audit's expected-shortfall set: directly evaluated laws, per-claim layers and mixtures of them
// (tests/fixtures/shortfall: mpmath at 40 digits, two methods per value).
import { compiled, failures, guarded, levels, num, read } from "./bound-audit-core";
import type { Model } from "@/lib/cf/types";
import { quantiles } from "@/lib/cf/invert/quantile";

export interface ShortfallFixture {
  laws: { name: string; model: Model; levels: { p: string; q: string; q_check: number; es: string; es_check: number }[] }[];
}

/**
 * tests/fixtures/shortfall/shortfall.json: ES at levels 1e-4 .. 0.9999 and the quantiles there. Each value's reference
 * uncertainty is its cross-check difference plus its 30 written digits; a quantile's is its root's residual in x.
 * A law without a finite ES (tail index at most 1 on the right: "inf") must not be answered with a finite number.
 */
export function directShortfall() {
  const set = "direct/shortfall";
  const f = read<ShortfallFixture>("shortfall/shortfall.json");
  for (const law of f.laws) {
    const c = compiled(set, law.model);
    if (!c) continue;
    const finite = law.levels.filter((l) => l.es !== "inf");
    levels(
      set,
      law.model,
      c,
      finite.map((l) => ({
        p: num(l.p),
        q: num(l.q),
        qErr: l.q_check + 1e-29 * Math.abs(num(l.q)),
        es: num(l.es),
        esErr: l.es_check + 1e-29 * Math.abs(num(l.es)),
      })),
    );
    const infinite = law.levels.filter((l) => l.es === "inf");
    if (!infinite.length) continue;
    const r = guarded(`${set} ${law.name} (no finite ES)`, () => quantiles(c, infinite.map((l) => num(l.p)), { expectedShortfall: true }));
    r?.expectedShortfall?.forEach((v, i) => {
      if (Number.isFinite(v)) failures.push(`${set} ${law.name} p=${infinite[i].p}: ES answered ${v} but the law has no finite ES`);
    });
  }
}
