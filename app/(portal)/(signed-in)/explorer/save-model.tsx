"use client";

import { useState } from "react";
import { portalFetch, PortalFetchError } from "../../_components/fetch";
import { OrgLink } from "../../_components/org-link";
import { FormError, inputClass, Notice, quietButtonClass } from "../../_components/ui";

export interface SavedModelVersion {
  version: number;
  model: unknown;
  levels: string | null;
  note: string | null;
}

/** Save the editor's model under a name: a new name starts at version 1, the same name adds a version. */
export function SaveModel({ text, levels, loaded, onSaved }: { text: string; levels: string; loaded: { id: number; name: string; version: number } | null; onSaved: (m: { id: number; name: string; version: number }) => void }) {
  const [name, setName] = useState(loaded?.name ?? "");
  const [note, setNote] = useState("");
  const [shared, setShared] = useState(true);
  const [error, setError] = useState<string | null>(null);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [lastLoaded, setLastLoaded] = useState(loaded);
  if (loaded !== lastLoaded) {
    setLastLoaded(loaded);
    if (loaded) setName(loaded.name);
  }

  async function save(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    setFields({});
    setDone(null);
    let model: unknown;
    try {
      model = JSON.parse(text);
    } catch (err) {
      return setError(`The model is not valid JSON: ${(err as Error).message}`);
    }
    if (!name.trim()) return setFields({ name: "Name the model, e.g. “Hail book 2026”." });
    setBusy(true);
    try {
      const r = await portalFetch<{ model: { id: number; name: string; version: number } }>("/api/portal/models", { body: { name: name.trim(), model, levels, shared, ...(note.trim() ? { note: note.trim() } : {}) } });
      setDone(`Saved “${r.model.name}” as version ${r.model.version}.`);
      setNote("");
      onSaved(r.model);
    } catch (err) {
      const p = (err as PortalFetchError).problem;
      setError(p?.error ?? "Could not save the model.");
      setFields(p?.fields ?? {});
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={save} className="space-y-3 rounded-xl border border-paper-line bg-white p-4" noValidate aria-labelledby="save-h">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="save-h" className="text-sm font-semibold">Save this model</h2>
        <OrgLink href="/models" className="text-sm font-semibold text-fold-600 hover:underline">
          Saved models
        </OrgLink>
      </div>
      {loaded ? <p className="text-xs text-ink-soft">Opened: “{loaded.name}”, version {loaded.version}. Saving under the same name adds a version.</p> : null}
      <label className="block text-sm">
        <span className="font-semibold">Name</span>
        <input className={inputClass} value={name} onChange={(e) => setName(e.target.value)} aria-invalid={fields.name ? true : undefined} />
      </label>
      {fields.name ? <p className="text-sm text-red-700">{fields.name}</p> : null}
      <label className="block text-sm">
        <span className="font-semibold">What changed (optional)</span>
        <input className={inputClass} value={note} onChange={(e) => setNote(e.target.value)} />
      </label>
      <label className="flex items-center gap-2 text-sm">
        <input type="checkbox" checked={shared} onChange={(e) => setShared(e.target.checked)} />
        Share with the organisation (otherwise only you see it)
      </label>
      <FormError message={error} />
      {Object.entries(fields).filter(([k]) => k.startsWith("/")).length ? (
        <ul className="text-sm text-red-700">
          {Object.entries(fields).filter(([k]) => k.startsWith("/")).map(([k, v]) => (
            <li key={k}>
              <code className="mr-1 rounded bg-red-50 px-1 font-mono text-xs">{k.replace(/^\/model/, "") || "/"}</code>
              {v}
            </li>
          ))}
        </ul>
      ) : null}
      {done ? <Notice tone="success">{done}</Notice> : null}
      <button type="submit" className={quietButtonClass} disabled={busy}>
        {busy ? "Saving…" : "Save model"}
      </button>
    </form>
  );
}
