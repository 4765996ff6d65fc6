"use client";

import { useState } from "react";
import { FAMILY_SPECS, type FamilyName } from "@/lib/cf/families/spec";
import { buttonClass, inputClass, quietButtonClass } from "../../_components/ui";

// The form for common cases: a sum of independent named terms. Anything else is written in the JSON editor.
const COMMON: FamilyName[] = ["normal", "uniform", "gamma", "exponential", "lognormal", "poisson", "binomial", "student_t"];

type Term = { family: FamilyName; values: Record<string, string> };

const defaults = (family: FamilyName): Record<string, string> =>
  Object.fromEntries(FAMILY_SPECS[family].params.filter((p) => !p.values).map((p) => [p.name, p.default !== undefined ? String(p.default) : p.lo > 0 || p.loOpen === false ? "1" : "1"]));

export function ModelBuilder({ onBuild }: { onBuild: (model: unknown) => void }) {
  const [terms, setTerms] = useState<Term[]>([{ family: "normal", values: { mu: "0", sigma: "1" } }]);

  const set = (i: number, t: Term) => setTerms((all) => all.map((x, j) => (j === i ? t : x)));
  const build = () => {
    const models = terms.map((t) => ({ family: t.family, ...Object.fromEntries(Object.entries(t.values).map(([k, v]) => [k, v.trim() === "" ? v : Number(v)])) }));
    onBuild(models.length === 1 ? models[0] : { sum: models });
  };

  return (
    <fieldset className="space-y-3 rounded-xl border border-paper-line bg-white p-4">
      <legend className="px-1 text-sm font-semibold">Sum of independent terms</legend>
      {terms.map((t, i) => (
        <div key={i} className="flex flex-wrap items-end gap-2 border-b border-paper-line pb-3 last:border-0">
          <label className="text-sm font-semibold">
            Term {i + 1}
            <select
              className={`${inputClass} w-40`}
              value={t.family}
              onChange={(e) => set(i, { family: e.target.value as FamilyName, values: defaults(e.target.value as FamilyName) })}
            >
              {COMMON.map((f) => (
                <option key={f} value={f}>
                  {FAMILY_SPECS[f].title}
                </option>
              ))}
            </select>
          </label>
          {FAMILY_SPECS[t.family].params
            .filter((p) => !p.values)
            .map((p) => (
              <label key={p.name} className="text-sm font-semibold" title={p.doc}>
                <span className="font-mono">{p.name}</span>
                <input
                  className={`${inputClass} w-24`}
                  inputMode="decimal"
                  value={t.values[p.name] ?? ""}
                  onChange={(e) => set(i, { ...t, values: { ...t.values, [p.name]: e.target.value } })}
                />
              </label>
            ))}
          {terms.length > 1 ? (
            <button type="button" className={quietButtonClass} aria-label={`Remove term ${i + 1}`} onClick={() => setTerms((all) => all.filter((_, j) => j !== i))}>
              Remove
            </button>
          ) : null}
        </div>
      ))}
      <div className="flex flex-wrap gap-2">
        <button type="button" className={quietButtonClass} onClick={() => setTerms((all) => [...all, { family: "normal", values: { mu: "0", sigma: "1" } }])}>
          Add a term
        </button>
        <button type="button" className={buttonClass} onClick={build}>
          Put into the editor
        </button>
      </div>
    </fieldset>
  );
}
