"use client";

import { useState } from "react";
import { buttonClass, inputClass, quietButtonClass } from "../../_components/ui";

// The form for common cases: a sum of independent named terms. Anything else is written in the JSON editor.
// The families' names and parameters come from the server page (read from the family specs there), so the
// browser bundle carries no part of the engine.
export type BuilderFamily = { name: string; title: string; params: { name: string; doc: string; start: string }[] };

type Term = { family: string; values: Record<string, string> };

export function ModelBuilder({ families, onBuild }: { families: BuilderFamily[]; onBuild: (model: unknown) => void }) {
  const byName = new Map(families.map((f) => [f.name, f]));
  const defaults = (family: string): Record<string, string> => Object.fromEntries((byName.get(family)?.params ?? []).map((p) => [p.name, p.start]));
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
              onChange={(e) => set(i, { family: e.target.value, values: defaults(e.target.value) })}
            >
              {families.map((f) => (
                <option key={f.name} value={f.name}>
                  {f.title}
                </option>
              ))}
            </select>
          </label>
          {(byName.get(t.family)?.params ?? []).map((p) => (
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
