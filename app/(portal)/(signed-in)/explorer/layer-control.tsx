"use client";

import { useId, useState } from "react";
import { buttonClass, inputClass } from "../../_components/ui";

/**
 * Per-claim layer for a compound model: wraps the compound's claim law ("each") in
 * { "layer": { deductible, limit, share }, "of": claim } and hands the new model text back.
 */
export function LayerControl({ text, onApply }: { text: string; onApply: (next: string) => void }) {
  const id = useId();
  const [deductible, setDeductible] = useState("");
  const [limit, setLimit] = useState("");
  const [share, setShare] = useState("");
  const [message, setMessage] = useState<string | null>(null);
  let model: unknown = null;
  try {
    model = JSON.parse(text);
  } catch {
    model = null;
  }
  const compound = model && typeof model === "object" && "compound" in model ? (model as { compound: { count: unknown; each: unknown } }).compound : null;
  if (!compound) return null;
  const each = compound.each as Record<string, unknown>;
  const current = each && typeof each === "object" && "layer" in each ? (each as { layer: Record<string, number>; of: unknown }) : null;

  function apply() {
    const terms: Record<string, number> = {};
    const read = (name: string, v: string, check: (x: number) => boolean, rule: string) => {
      if (v.trim() === "") return true;
      const x = Number(v);
      if (!Number.isFinite(x) || !check(x)) {
        setMessage(`The ${name} must be ${rule}; got “${v}”.`);
        return false;
      }
      terms[name] = x;
      return true;
    };
    if (!read("deductible", deductible, (x) => x >= 0, "a number >= 0")) return;
    if (!read("limit", limit, (x) => x > 0, "a number > 0 (leave it empty for no limit)")) return;
    if (!read("share", share, (x) => x > 0 && x <= 1, "a number in (0, 1]")) return;
    setMessage(null);
    const claim = current ? current.of : compound!.each;
    const next = Object.keys(terms).length ? { layer: terms, of: claim } : claim;
    onApply(JSON.stringify({ compound: { count: compound!.count, each: next } }, null, 2));
  }

  return (
    <fieldset className="rounded-xl border border-paper-line bg-white p-4">
      <legend className="px-1 text-sm font-semibold">Per-claim layer</legend>
      <p className="text-sm text-ink-soft">
        Each claim pays share × min(max(claim − deductible, 0), limit). Leave a field empty for its default (deductible 0, no limit, share 1).
        {current ? ` Now: ${JSON.stringify(current.layer)}.` : ""}
      </p>
      <div className="mt-2 grid grid-cols-3 gap-2">
        <label className="text-sm" htmlFor={`${id}-d`}>
          Deductible
          <input id={`${id}-d`} className={inputClass} inputMode="decimal" value={deductible} onChange={(e) => setDeductible(e.target.value)} />
        </label>
        <label className="text-sm" htmlFor={`${id}-l`}>
          Limit
          <input id={`${id}-l`} className={inputClass} inputMode="decimal" value={limit} onChange={(e) => setLimit(e.target.value)} />
        </label>
        <label className="text-sm" htmlFor={`${id}-c`}>
          Share
          <input id={`${id}-c`} className={inputClass} inputMode="decimal" value={share} onChange={(e) => setShare(e.target.value)} />
        </label>
      </div>
      {message ? <p className="mt-1 text-sm text-red-700">{message}</p> : null}
      <button type="button" className={`${buttonClass} mt-2`} onClick={apply}>
        Apply the layer to each claim
      </button>
    </fieldset>
  );
}
