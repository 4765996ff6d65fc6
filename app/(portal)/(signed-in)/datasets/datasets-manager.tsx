"use client";

import { useCallback, useEffect, useState } from "react";
import { portalFetch, PortalFetchError, withOrg } from "../../_components/fetch";
import { OrgLink } from "../../_components/org-link";
import { buttonClass, Empty, fmtDate, FormError, Loading, Notice, PageHeader } from "../../_components/ui";
import { fmtNum, type ListedDataset } from "./types";
import { UploadForm } from "./upload-form";

export function DatasetsManager() {
  const [rows, setRows] = useState<ListedDataset[] | null>(null);
  const [canUpload, setCanUpload] = useState(false);
  const [loadError, setLoadError] = useState<string | null>(null);
  const [uploading, setUploading] = useState(false);
  const [flash, setFlash] = useState<{ id: string; text: string } | null>(null);

  const load = useCallback(() => {
    portalFetch<{ datasets: ListedDataset[]; canUpload: boolean }>("/api/portal/datasets")
      .then((r) => {
        setRows(r.datasets);
        setCanUpload(r.canUpload);
        setLoadError(null);
      })
      .catch((e: PortalFetchError) => setLoadError(e.problem?.error ?? "The datasets could not be loaded."));
  }, []);
  useEffect(load, [load]);

  return (
    <div className="space-y-6">
      <PageHeader
        title="Datasets"
        lead={
          <>
            Observed samples and loss tables of your organisation. A model uses one as <code className="font-mono text-sm">{'{ "dataset": "<id>", "version": n }'}</code>; its law is the
            empirical law of the data.
          </>
        }
        actions={
          canUpload && !uploading ? (
            <button type="button" className={buttonClass} onClick={() => (setUploading(true), setFlash(null))}>
              Upload a dataset
            </button>
          ) : null
        }
      />
      {flash ? (
        <Notice tone="success">
          {flash.text}{" "}
          <OrgLink href={`/datasets/${flash.id}`} className="font-semibold underline">
            Open it
          </OrgLink>
        </Notice>
      ) : null}
      {uploading ? (
        <UploadForm
          onCancel={() => setUploading(false)}
          onDone={(r) => {
            setUploading(false);
            setFlash({ id: r.dataset.id, text: `“${r.dataset.name}” stored: ${r.version.rows.toLocaleString("en-GB")} values${r.version.skippedRows ? `, ${r.version.skippedRows} rows skipped` : ""}. Its id is ${r.dataset.id}.` });
            load();
          }}
        />
      ) : null}
      {loadError ? <FormError message={loadError} /> : null}
      {rows === null && !loadError ? <Loading label="Loading datasets…" /> : null}
      {rows && rows.length === 0 ? (
        <Empty title="No datasets yet">{canUpload ? "Upload a CSV, a TSV or a plain list of numbers to start." : "Developers and admins can upload datasets."}</Empty>
      ) : null}
      {rows && rows.length > 0 ? (
        <div className="overflow-x-auto rounded-xl border border-paper-line bg-white">
          <table className="w-full text-sm">
            <thead className="bg-paper-warm text-left text-xs uppercase tracking-wide text-ink-soft">
              <tr>
                <th className="px-4 py-2">Name</th>
                <th className="px-4 py-2">Id</th>
                <th className="px-4 py-2 text-right">Version</th>
                <th className="px-4 py-2 text-right">n</th>
                <th className="px-4 py-2 text-right">Mean</th>
                <th className="px-4 py-2 text-right">SD</th>
                <th className="px-4 py-2">Updated</th>
              </tr>
            </thead>
            <tbody>
              {rows.map((d) => (
                <tr key={d.id} className="border-t border-paper-line">
                  <td className="min-w-[12rem] px-4 py-2">
                    <OrgLink href={`/datasets/${d.id}`} className="font-semibold text-fold-600 hover:underline">
                      {d.name}
                    </OrgLink>
                    {d.description ? <p className="text-xs text-ink-faint">{d.description}</p> : null}
                  </td>
                  <td className="px-4 py-2 font-mono text-xs">{d.id}</td>
                  <td className="px-4 py-2 text-right tabular-nums">{d.latestVersion}</td>
                  <td className="px-4 py-2 text-right tabular-nums">{fmtNum(d.latest?.summary.n)}</td>
                  <td className="px-4 py-2 text-right tabular-nums">{fmtNum(d.latest?.summary.mean)}</td>
                  <td className="px-4 py-2 text-right tabular-nums">{fmtNum(d.latest?.summary.sd)}</td>
                  <td className="px-4 py-2 text-ink-soft">{fmtDate(d.updatedAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </div>
  );
}
