"use client";

import { useCallback, useEffect, useState } from "react";
import { portalFetch, PortalFetchError } from "../../_components/fetch";
import { useMe } from "../../_components/me";
import { OrgLink } from "../../_components/org-link";
import { dangerButtonClass, Empty, fmtDate, FormError, Loading, Notice, PageHeader, quietButtonClass } from "../../_components/ui";

interface Listed {
  id: number;
  name: string;
  description: string;
  shared: boolean;
  latestVersion: number;
  createdByName: string | null;
  createdAt: string;
  updatedAt: string | null;
  mine: boolean;
}
interface Version {
  version: number;
  note: string | null;
  createdAt: string;
  createdByName: string | null;
}

/** The organisation's saved models (shared ones and the person's own), with their versions. */
export function ModelsList() {
  const { me } = useMe();
  const [models, setModels] = useState<Listed[] | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [flash, setFlash] = useState<string | null>(null);
  const [open, setOpen] = useState<number | null>(null);
  const [versions, setVersions] = useState<Version[]>([]);
  const [confirm, setConfirm] = useState<number | null>(null);

  const load = useCallback(() => {
    portalFetch<{ models: Listed[] }>("/api/portal/models")
      .then((r) => setModels(r.models))
      .catch((e: PortalFetchError) => setError(e.problem?.error ?? "Could not load the models."));
  }, []);
  useEffect(load, [load]);

  async function act(message: string, p: Promise<unknown>) {
    setError(null);
    try {
      await p;
      setFlash(message);
      load();
    } catch (e) {
      setError((e as PortalFetchError).problem?.error ?? "That did not work.");
    }
  }

  async function showVersions(id: number) {
    if (open === id) return setOpen(null);
    setOpen(id);
    setVersions([]);
    const r = await portalFetch<{ versions: Version[] }>(`/api/portal/models/${id}`).catch(() => ({ versions: [] }));
    setVersions(r.versions);
  }

  const canManage = (m: Listed) => m.mine || me?.role === "admin";

  return (
    <div className="space-y-6">
      <PageHeader
        title="Saved models"
        lead="Models saved from the explorer. Shared ones are seen by every developer and admin of the organisation; each save under the same name is a new version, and versions never change."
        actions={
          <OrgLink href="/explorer" className={quietButtonClass}>
            Open the explorer
          </OrgLink>
        }
      />
      <FormError message={error} />
      {flash ? <Notice tone="success">{flash}</Notice> : null}
      {!models ? (
        <Loading />
      ) : models.length === 0 ? (
        <Empty title="No saved models yet">Run a model in the explorer, then save it under a name.</Empty>
      ) : (
        <ul className="space-y-3" aria-label="Saved models">
          {models.map((m) => (
            <li key={m.id} className="rounded-xl border border-paper-line bg-white p-4" data-model={m.name}>
              <div className="flex flex-wrap items-start justify-between gap-3">
                <div className="min-w-0">
                  <h2 className="font-display text-lg font-semibold break-words">{m.name}</h2>
                  {m.description ? <p className="text-sm text-ink-soft">{m.description}</p> : null}
                  <p className="mt-1 text-xs text-ink-faint">
                    {/* no author on record (the demo's seeded models, or a person since removed): the clause is left out rather than guessed */}
                    Version {m.latestVersion} · {m.shared ? "shared with the organisation" : "only you"}
                    {m.mine ? " · saved by you" : m.createdByName ? ` · saved by ${m.createdByName}` : ""} · {fmtDate(m.updatedAt ?? m.createdAt)}
                  </p>
                </div>
                <div className="flex flex-wrap gap-2">
                  <OrgLink href={`/explorer?model=${m.id}`} className={quietButtonClass} aria-label={`Open ${m.name} in the explorer`}>
                    Open
                  </OrgLink>
                  <button type="button" className={quietButtonClass} aria-expanded={open === m.id} onClick={() => showVersions(m.id)}>
                    Versions
                  </button>
                  {canManage(m) ? (
                    <button type="button" className={quietButtonClass} onClick={() => act(m.shared ? `“${m.name}” is now yours only.` : `“${m.name}” is shared with the organisation.`, portalFetch(`/api/portal/models/${m.id}`, { method: "PATCH", body: { shared: !m.shared } }))}>
                      {m.shared ? "Make private" : "Share"}
                    </button>
                  ) : null}
                  {canManage(m) ? (
                    confirm === m.id ? (
                      <span className="flex flex-wrap items-center gap-2 text-sm">
                        Delete every version?
                        <button type="button" className={dangerButtonClass} onClick={() => { setConfirm(null); void act(`“${m.name}” was deleted.`, portalFetch(`/api/portal/models/${m.id}`, { method: "DELETE" })); }}>
                          Delete
                        </button>
                        <button type="button" className={quietButtonClass} onClick={() => setConfirm(null)}>
                          Keep
                        </button>
                      </span>
                    ) : (
                      <button type="button" className={dangerButtonClass} onClick={() => setConfirm(m.id)} aria-label={`Delete ${m.name}`}>
                        Delete
                      </button>
                    )
                  ) : null}
                </div>
              </div>
              {open === m.id ? (
                <ol className="mt-3 space-y-1 border-t border-paper-line pt-3 text-sm" aria-label={`Versions of ${m.name}`}>
                  {versions.map((v) => (
                    <li key={v.version} className="flex flex-wrap items-baseline gap-x-3">
                      <OrgLink href={`/explorer?model=${m.id}&version=${v.version}`} className="font-semibold text-fold-600 hover:underline">
                        Version {v.version}
                      </OrgLink>
                      <span className="text-ink-faint">{fmtDate(v.createdAt)}{v.createdByName ? ` · ${v.createdByName}` : ""}</span>
                      {v.note ? <span className="text-ink-soft">{v.note}</span> : null}
                    </li>
                  ))}
                </ol>
              ) : null}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
