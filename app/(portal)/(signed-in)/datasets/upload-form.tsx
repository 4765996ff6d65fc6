"use client";

import { useEffect, useId, useRef, useState, type FormEvent } from "react";
import { isDatasetParseError } from "@/lib/datasets/errors";
import { MAX_UPLOAD_BYTES, SNIFF_BYTES } from "@/lib/datasets/limits";
import { uploadQuerySchema } from "@/lib/datasets/schemas";
import { fieldErrors } from "@/lib/portal/schemas";
import { DELIMITER_NAMES, resolveColumn, sniff, type SniffResult } from "@/lib/datasets/sniff";
import { buttonClass, FormError, inputClass, quietButtonClass } from "../../_components/ui";
import { orgHeaders } from "../../_components/fetch";
import { fmtBytes, type DatasetJson, type VersionJson } from "./types";

type Format = "auto" | "csv" | "tsv" | "list" | "xlsx";
type Delimiter = "" | "," | ";" | "\t" | "|";
type Decimal = "auto" | "dot" | "comma";
const isExcel = (f: File | null, format: Format) => format === "xlsx" || !!f?.name.toLowerCase().endsWith(".xlsx");
interface Problem {
  error: string;
  problem?: { code: string; line?: number; column?: number; value?: string; counts?: Record<string, number> };
  fields?: Record<string, string>;
}
interface Progress {
  sent: number;
  parsed: number;
  rows: number;
  phase: "uploading" | "receiving" | "storing" | "done" | "failed";
}

const newUploadId = () => `up_${Math.random().toString(36).slice(2, 12)}${Date.now().toString(36)}`;

function Bar({ label, value, max, detail }: { label: string; value: number; max: number; detail: string }) {
  const pct = max > 0 ? Math.min(100, Math.round((value / max) * 100)) : 0;
  return (
    <div>
      <div className="flex justify-between text-xs text-ink-soft">
        <span className="font-semibold">{label}</span>
        <span>{detail}</span>
      </div>
      <div role="progressbar" aria-label={label} aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct} className="mt-1 h-2 overflow-hidden rounded-full bg-paper-warm">
        <div className="h-full bg-fold-500 transition-[width]" style={{ width: `${pct}%` }} />
      </div>
    </div>
  );
}

/**
 * Upload of a file as a new dataset (or, with `datasetId`, a new version): the file's first 64 KiB are read
 * in the browser to offer its columns, then the file streams to the server with an upload bar, and the
 * server's parsing progress is polled for the second bar.
 */
export function UploadForm({ datasetId, onDone, onCancel }: { datasetId?: string; onDone: (r: { dataset: DatasetJson; version: VersionJson }) => void; onCancel?: () => void }) {
  const ids = useId();
  const [file, setFile] = useState<File | null>(null);
  const [shape, setShape] = useState<SniffResult | null>(null);
  const [sniffError, setSniffError] = useState<string | null>(null);
  const [name, setName] = useState("");
  const [description, setDescription] = useState("");
  const [format, setFormat] = useState<Format>("auto");
  const [delimiter, setDelimiter] = useState<Delimiter>("");
  const [decimal, setDecimal] = useState<Decimal>("auto");
  const [sheet, setSheet] = useState("");
  const [column, setColumn] = useState("");
  const [weights, setWeights] = useState("");
  const [skip, setSkip] = useState(false);
  const [progress, setProgress] = useState<Progress | null>(null);
  const [problem, setProblem] = useState<Problem | null>(null);
  const poll = useRef<ReturnType<typeof setInterval> | null>(null);

  useEffect(() => () => void (poll.current && clearInterval(poll.current)), []);

  useEffect(() => {
    if (!file) return;
    if (isExcel(file, format)) {
      // A workbook is read on the server; its first sheet and first numeric column are taken unless chosen.
      setShape(null);
      setSniffError(null);
      return;
    }
    let stale = false;
    file
      .slice(0, SNIFF_BYTES)
      .text()
      .then((text) => {
        if (stale) return;
        try {
          const s = sniff(text, file.size <= SNIFF_BYTES, { format: format === "xlsx" ? "auto" : format, delimiter: delimiter || undefined, decimal });
          setShape(s);
          setSniffError(null);
          // The same default as the server: the first numeric column that is not an identifier.
          let def = 0;
          try {
            def = resolveColumn(s, undefined, "values");
          } catch {
            def = s.numericColumns[0] ?? 0;
          }
          setColumn((c) => (c && (s.header ? s.columns.includes(c) : Number(c) <= s.columns.length) ? c : s.header ? s.columns[def] : String(def + 1)));
        } catch (e) {
          setShape(null);
          setSniffError(isDatasetParseError(e) ? e.message : "The start of the file could not be read.");
        }
      });
    return () => {
      stale = true;
    };
  }, [file, format, delimiter, decimal]);

  function pick(f: File | null) {
    setFile(f);
    setProblem(null);
    setProgress(null);
    setWeights("");
    setColumn("");
    if (f && !datasetId && !name) setName(f.name.replace(/\.[^.]+$/, "").replace(/[_-]+/g, " "));
  }

  function submit(e: FormEvent) {
    e.preventDefault();
    if (!file) return setProblem({ error: "Choose a file to upload." });
    if (file.size > MAX_UPLOAD_BYTES) return setProblem({ error: `The file is ${fmtBytes(file.size)}; the upload limit is ${fmtBytes(MAX_UPLOAD_BYTES)}. Split it, or aggregate it into a frequency table with a counts column.` });
    const uploadId = newUploadId();
    const excel = isExcel(file, format);
    const fields = {
      ...(datasetId ? {} : { name, description }),
      fileName: file.name,
      format: excel ? "xlsx" : format,
      ...(excel ? { sheet } : { delimiter, decimal }),
      column,
      weights,
      onInvalid: skip ? "skip" : "fail",
      uploadId,
    };
    const checked = uploadQuerySchema.safeParse(Object.fromEntries(Object.entries(fields).filter(([, v]) => v !== "")));
    if (!checked.success) return setProblem({ error: "Some fields need attention.", fields: fieldErrors(checked.error) });
    setProblem(null);
    setProgress({ sent: 0, parsed: 0, rows: 0, phase: "uploading" });
    const qs = new URLSearchParams(Object.entries(fields).filter(([, v]) => v !== "") as [string, string][]);
    const xhr = new XMLHttpRequest();
    xhr.open("POST", `${datasetId ? `/api/portal/datasets/${datasetId}/versions` : "/api/portal/datasets"}?${qs}`);
    xhr.setRequestHeader("content-type", file.type || "text/plain");
    for (const [k, v] of Object.entries(orgHeaders())) xhr.setRequestHeader(k, v);
    xhr.upload.onprogress = (ev) => setProgress((p) => (p ? { ...p, sent: ev.loaded } : p));
    const stopPolling = () => {
      if (poll.current) clearInterval(poll.current);
      poll.current = null;
    };
    poll.current = setInterval(() => {
      fetch(`/api/portal/datasets/uploads/${uploadId}`, { cache: "no-store", headers: orgHeaders() })
        .then((r) => (r.ok ? r.json() : null))
        .then((p: { phase: Progress["phase"]; bytesRead: number; rows: number } | null) => {
          if (p) setProgress((q) => (q && q.phase !== "done" && q.phase !== "failed" ? { ...q, parsed: p.bytesRead, rows: p.rows, phase: p.phase } : q));
        })
        .catch(() => undefined);
    }, 250);
    xhr.onload = () => {
      stopPolling();
      let body: Problem & { dataset?: DatasetJson; version?: VersionJson } = { error: "" };
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        body = { error: `The upload failed (${xhr.status}).` };
      }
      if (xhr.status === 201 && body.dataset && body.version) {
        setProgress({ sent: file.size, parsed: file.size, rows: body.version.rows + body.version.skippedRows, phase: "done" });
        onDone({ dataset: body.dataset, version: body.version });
      } else {
        setProgress((p) => (p ? { ...p, phase: "failed" } : p));
        setProblem(body.error ? body : { error: `The upload failed (${xhr.status}).` });
      }
    };
    xhr.onerror = () => {
      stopPolling();
      setProgress((p) => (p ? { ...p, phase: "failed" } : p));
      setProblem({ error: "The upload was interrupted. Check your connection and try again." });
    };
    xhr.send(file);
  }

  const busy = progress !== null && progress.phase !== "done" && progress.phase !== "failed";
  const colOptions = shape ? shape.columns.map((c, i) => ({ value: shape.header ? c : String(i + 1), label: shape.numericColumns.includes(i) ? c : `${c} (not numeric)` })) : [];
  const p = problem?.problem;

  return (
    <form onSubmit={submit} className="space-y-4 rounded-xl border border-paper-line bg-white p-5 shadow-sm" aria-label={datasetId ? "Upload a new version" : "Upload a dataset"}>
      <div>
        <label htmlFor={`${ids}-file`} className="block text-sm font-semibold">
          File
        </label>
        <input id={`${ids}-file`} name="file" type="file" accept=".csv,.tsv,.txt,.dat,.xlsx,text/csv,text/plain,text/tab-separated-values,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet" className="mt-1 block w-full text-sm" disabled={busy} onChange={(e) => pick(e.target.files?.[0] ?? null)} />
        <p className="mt-1 text-xs text-ink-faint">CSV or TSV (any delimiter, decimal point or decimal comma), an Excel workbook (.xlsx, up to 20 MiB), or a plain list with one number per line. Up to 50 MiB and 1,000,000 values.</p>
      </div>
      {sniffError ? <FormError message={sniffError} /> : null}
      {file && shape ? (
        <p className="text-sm text-ink-soft" data-testid="detected">
          {fmtBytes(file.size)} ·{" "}
          {shape.delimiter === null ? "a plain list" : `${shape.format.toUpperCase()} separated by ${DELIMITER_NAMES[shape.delimiter] ?? shape.delimiter}`}
          {shape.header ? `, header: ${shape.columns.join(", ")}` : ", no header row"}
          {shape.decimal === "comma" ? ", decimal comma" : ""}
        </p>
      ) : null}
      {file && isExcel(file, format) ? (
        <p className="text-sm text-ink-soft" data-testid="detected">
          {fmtBytes(file.size)} · Excel workbook: the sheet below (or the first) is read, and the first column holding numbers unless you name one.
        </p>
      ) : null}
      {!datasetId ? (
        <div className="grid gap-4 sm:grid-cols-2">
          <div>
            <label htmlFor={`${ids}-name`} className="block text-sm font-semibold">
              Name
            </label>
            <input id={`${ids}-name`} className={inputClass} value={name} onChange={(e) => setName(e.target.value)} aria-invalid={problem?.fields?.name ? true : undefined} disabled={busy} />
            {problem?.fields?.name ? <p className="mt-1 text-sm text-red-700">{problem.fields.name}</p> : null}
          </div>
          <div>
            <label htmlFor={`${ids}-desc`} className="block text-sm font-semibold">
              Description
            </label>
            <input id={`${ids}-desc`} className={inputClass} value={description} onChange={(e) => setDescription(e.target.value)} disabled={busy} />
          </div>
        </div>
      ) : null}
      {file && isExcel(file, format) ? (
        <div className="grid gap-4 sm:grid-cols-3">
          <div>
            <label htmlFor={`${ids}-sheet`} className="block text-sm font-semibold">
              Sheet
            </label>
            <input id={`${ids}-sheet`} className={inputClass} value={sheet} onChange={(e) => setSheet(e.target.value)} placeholder="the first sheet" disabled={busy} />
          </div>
          <div>
            <label htmlFor={`${ids}-xcol`} className="block text-sm font-semibold">
              Values column (header name or number)
            </label>
            <input id={`${ids}-xcol`} className={inputClass} value={column} onChange={(e) => setColumn(e.target.value)} placeholder="the first numeric column" disabled={busy} />
          </div>
          <div>
            <label htmlFor={`${ids}-xw`} className="block text-sm font-semibold">
              Weights or counts column
            </label>
            <input id={`${ids}-xw`} className={inputClass} value={weights} onChange={(e) => setWeights(e.target.value)} placeholder="none" disabled={busy} />
          </div>
        </div>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-3">
        <div>
          <label htmlFor={`${ids}-format`} className="block text-sm font-semibold">
            Format
          </label>
          <select id={`${ids}-format`} className={inputClass} value={format} onChange={(e) => setFormat(e.target.value as Format)} disabled={busy}>
            <option value="auto">Detect</option>
            <option value="csv">CSV (comma)</option>
            <option value="tsv">TSV (tab)</option>
            <option value="list">Plain list</option>
            <option value="xlsx">Excel workbook (.xlsx)</option>
          </select>
        </div>
        <div>
          <label htmlFor={`${ids}-delim`} className="block text-sm font-semibold">
            Delimiter
          </label>
          <select id={`${ids}-delim`} className={inputClass} value={delimiter} onChange={(e) => setDelimiter(e.target.value as Delimiter)} disabled={busy || isExcel(file, format) || format === "list"}>
            <option value="">Detect</option>
            <option value=",">Comma ,</option>
            <option value=";">Semicolon ;</option>
            <option value={"\t"}>Tab</option>
            <option value="|">Vertical bar |</option>
          </select>
        </div>
        <div>
          <label htmlFor={`${ids}-decimal`} className="block text-sm font-semibold">
            Decimal mark
          </label>
          <select id={`${ids}-decimal`} className={inputClass} value={decimal} onChange={(e) => setDecimal(e.target.value as Decimal)} disabled={busy || isExcel(file, format)}>
            <option value="auto">Detect</option>
            <option value="dot">Point (12.5)</option>
            <option value="comma">Comma (12,5)</option>
          </select>
        </div>
      </div>
      <div className={`grid gap-4 sm:grid-cols-2 ${file && isExcel(file, format) ? "hidden" : ""}`}>
        <div>
          <label htmlFor={`${ids}-column`} className="block text-sm font-semibold">
            Values column
          </label>
          <select id={`${ids}-column`} className={inputClass} value={column} onChange={(e) => setColumn(e.target.value)} disabled={busy || colOptions.length < 2}>
            {colOptions.map((o) => (
              <option key={o.value} value={o.value}>
                {o.label}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor={`${ids}-weights`} className="block text-sm font-semibold">
            Weights or counts
          </label>
          <select id={`${ids}-weights`} className={inputClass} value={weights} onChange={(e) => setWeights(e.target.value)} disabled={busy || colOptions.length < 2}>
            <option value="">None</option>
            {colOptions
              .filter((o) => o.value !== column)
              .map((o) => (
                <option key={o.value} value={o.value}>
                  {o.label}
                </option>
              ))}
          </select>
        </div>
      </div>
      <label className="flex items-center gap-2 text-sm">
        <input type="checkbox" checked={skip} onChange={(e) => setSkip(e.target.checked)} disabled={busy} />
        Skip rows with an empty or non-numeric value (they are counted in the dataset's notes)
      </label>
      {progress ? (
        <div className="space-y-3" aria-live="polite">
          <Bar label="Upload" value={progress.sent} max={file?.size ?? 0} detail={`${fmtBytes(progress.sent)} of ${fmtBytes(file?.size ?? 0)}`} />
          <Bar
            label="Parsing"
            value={progress.phase === "done" ? 1 : progress.parsed}
            max={progress.phase === "done" ? 1 : (file?.size ?? 0)}
            detail={progress.phase === "storing" ? "storing…" : progress.phase === "done" ? `done, ${progress.rows.toLocaleString("en-GB")} rows` : progress.phase === "failed" ? "stopped" : `${progress.rows.toLocaleString("en-GB")} rows read`}
          />
        </div>
      ) : null}
      {problem && !problem.fields ? (
        <div role="alert" className="rounded-md border border-red-300 bg-red-50 px-3 py-2 text-sm text-red-800" data-testid="upload-error">
          <p className="font-semibold">{p?.line ? `Problem at line ${p.line}${p.column ? `, column ${p.column}` : ""}` : "The file was not stored"}</p>
          <p className="mt-1">{problem.error}</p>
          {p ? <p className="mt-1 text-xs">Nothing was stored. Fix the file or the choices above, then upload again.</p> : null}
        </div>
      ) : null}
      <div className="flex gap-2">
        <button type="submit" className={buttonClass} disabled={busy || !file}>
          {busy ? "Uploading…" : datasetId ? "Upload new version" : "Upload"}
        </button>
        {onCancel ? (
          <button type="button" className={quietButtonClass} onClick={onCancel} disabled={busy}>
            Cancel
          </button>
        ) : null}
      </div>
    </form>
  );
}
