"use client";

import { useRouter } from "next/navigation";
import { useCallback, useEffect, useState, type FormEvent } from "react";
import { portalFetch, PortalFetchError, withOrg } from "../../_components/fetch";
import { OrgLink } from "../../_components/org-link";
import { buttonClass, dangerButtonClass, Field, fmtDate, FormError, Loading, Notice, PageHeader, quietButtonClass } from "../../_components/ui";
import { HistogramPreview } from "./histogram";
import { SummaryTable } from "./summary-table";
import { fmtBytes, type DatasetView, type VersionJson } from "./types";
import { UploadForm } from "./upload-form";

export function DatasetDetail({ id }: { id: string }) {
  const router = useRouter();
  const [data, setData] = useState<{ dataset: DatasetView; versions: VersionJson[] } | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [shown, setShown] = useState<number | null>(null);
  const [editing, setEditing] = useState(false);
  const [name, setName] = useState("");
  const [description, setDescription] = useState("");
  const [fields, setFields] = useState<Record<string, string>>({});
  const [newVersion, setNewVersion] = useState(false);
  const [flash, setFlash] = useState<string | null>(null);

  const load = useCallback(() => {
    portalFetch<{ dataset: DatasetView; versions: VersionJson[] }>(`/api/portal/datasets/${encodeURIComponent(id)}`)
      .then((r) => {
        setData(r);
        setError(null);
      })
      .catch((e: PortalFetchError) => setError(e.problem?.error ?? "The dataset could not be loaded."));
  }, [id]);
  useEffect(load, [load]);

  if (error) return <FormError message={error} />;
  if (!data) return <Loading label="Loading the dataset…" />;
  const { dataset, versions } = data;
  const v = versions.find((x) => x.version === (shown ?? dataset.latestVersion)) ?? versions[0];

  async function save(e: FormEvent) {
    e.preventDefault();
    try {
      await portalFetch(`/api/portal/datasets/${id}`, { method: "PATCH", body: { name, description } });
      setEditing(false);
      setFields({});
      setFlash("Saved.");
      load();
    } catch (err) {
      const p = (err as PortalFetchError).problem;
      setFields(p?.fields ?? { name: p?.error ?? "Could not save." });
    }
  }

  async function remove() {
    if (!window.confirm(`Delete “${dataset.name}” with all ${versions.length} version(s)? Models that name it will stop working.`)) return;
    try {
      await portalFetch(`/api/portal/datasets/${id}`, { method: "DELETE" });
      router.push(withOrg("/datasets"));
    } catch (err) {
      setError((err as PortalFetchError).problem?.error ?? "Could not delete.");
    }
  }

  return (
    <div className="space-y-6">
      <p className="text-sm">
        <OrgLink href="/datasets" className="font-semibold text-fold-600 hover:underline">
          ← Datasets
        </OrgLink>
      </p>
      <PageHeader
        title={dataset.name}
        lead={dataset.description || undefined}
        actions={
          dataset.canChange ? (
            <div className="flex gap-2">
              <button type="button" className={quietButtonClass} onClick={() => (setEditing(true), setName(dataset.name), setDescription(dataset.description))}>
                Rename or describe
              </button>
              <button type="button" className={quietButtonClass} onClick={() => setNewVersion(true)}>
                New version
              </button>
              <button type="button" className={dangerButtonClass} onClick={remove}>
                Delete
              </button>
            </div>
          ) : null
        }
      />
      {flash ? <Notice tone="success">{flash}</Notice> : null}
      <p className="text-sm text-ink-soft">
        Use it in a model as <code className="rounded bg-paper-warm px-1 font-mono">{`{ "dataset": "${dataset.id}", "version": ${v.version} }`}</code>. A new upload is a new version; versions never change.
      </p>
      {editing ? (
        <form onSubmit={save} className="space-y-3 rounded-xl border border-paper-line bg-white p-5" aria-label="Rename or describe">
          <Field label="Name" name="name" value={name} onChange={setName} error={fields.name} />
          <Field label="Description" name="description" value={description} onChange={setDescription} error={fields.description} />
          <div className="flex gap-2">
            <button type="submit" className={buttonClass}>
              Save
            </button>
            <button type="button" className={quietButtonClass} onClick={() => setEditing(false)}>
              Cancel
            </button>
          </div>
        </form>
      ) : null}
      {newVersion ? (
        <UploadForm
          datasetId={dataset.id}
          onCancel={() => setNewVersion(false)}
          onDone={(r) => {
            setNewVersion(false);
            setShown(r.version.version);
            setFlash(`Version ${r.version.version} stored: ${r.version.rows.toLocaleString("en-GB")} values.`);
            load();
          }}
        />
      ) : null}
      <div className="grid gap-6 lg:grid-cols-2">
        <section className="space-y-3">
          <h2 className="font-display text-xl font-semibold">Version {v.version} summary</h2>
          <SummaryTable v={v} />
          {v.notes.length ? (
            <ul className="list-disc pl-5 text-xs text-ink-soft">
              {v.notes.map((n) => (
                <li key={n}>{n}</li>
              ))}
            </ul>
          ) : null}
        </section>
        <section className="space-y-3">
          <h2 className="font-display text-xl font-semibold">Histogram</h2>
          <HistogramPreview h={v.histogram} label={`${dataset.name}, version ${v.version}`} />
        </section>
      </div>
      <section>
        <h2 className="font-display text-xl font-semibold">Versions</h2>
        <div className="overflow-x-auto">
        <table className="mt-2 w-full text-sm">
          <thead className="text-left text-xs uppercase tracking-wide text-ink-soft">
            <tr>
              <th className="py-1.5 pr-4">Version</th>
              <th className="py-1.5 pr-4">File</th>
              <th className="py-1.5 pr-6 text-right">Rows</th>
              <th className="py-1.5 pr-4">Uploaded</th>
              <th className="py-1.5" />
            </tr>
          </thead>
          <tbody>
            {versions.map((x) => (
              <tr key={x.version} className="border-t border-paper-line">
                <td className="py-1.5 pr-4">
                  <button type="button" className="font-semibold text-fold-600 hover:underline" onClick={() => setShown(x.version)} aria-pressed={x.version === v.version}>
                    {x.version}
                  </button>
                </td>
                <td className="py-1.5 pr-4">
                  {x.fileName} <span className="text-ink-faint">({fmtBytes(x.fileBytes)})</span>
                </td>
                <td className="py-1.5 pr-6 text-right tabular-nums">
                  {x.rows.toLocaleString("en-GB")}
                  {x.skippedRows ? <span className="text-ink-faint"> (+{x.skippedRows} skipped)</span> : null}
                </td>
                <td className="py-1.5 pr-4 text-ink-soft">{fmtDate(x.createdAt)}</td>
                <td className="py-1.5 text-right">
                  <a href={withOrg(`/api/portal/datasets/${dataset.id}/versions/${x.version}/raw`)} className="text-fold-600 hover:underline" title={`SHA-256 ${x.fileSha256}`}>
                    Raw file
                  </a>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
        </div>
      </section>
    </div>
  );
}
