"use client";

import { useId, useState } from "react";
import { isCfError } from "@/lib/cf/errors";
import { validateModel } from "@/lib/cf/validate";
import { orgHeaders } from "../../_components/fetch";
import { buttonClass, FormError, inputClass, Loading, PageHeader, quietButtonClass } from "../../_components/ui";
import { ModelBuilder } from "./model-builder";
import { ResultChart, type DensityResult } from "./result-chart";
import { TEMPLATES } from "./templates";

interface Problem {
  title?: string;
  detail?: string;
  errors?: { detail: string; pointer: string }[];
}
interface QuantileResult {
  p: number[];
  x: number[];
  expectedShortfall?: (number | null)[];
}
interface MomentResult {
  mean: number | null;
  variance: number | null;
  skewness: number | null;
  excessKurtosis: number | null;
  cumulants: (number | null)[];
  notes: string[];
}
interface Results {
  density: DensityResult & { diagnostics: Record<string, unknown> };
  quantiles: QuantileResult & { diagnostics: Record<string, unknown> };
  moments: MomentResult;
}

const pretty = (v: unknown) => JSON.stringify(v, null, 2);
const num = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? "does not exist" : Number(v.toPrecision(8)).toString());

/** Parses the levels field: numbers strictly between 0 and 1, separated by commas or spaces. */
function parseLevels(s: string): number[] | string {
  const parts = s.split(/[\s,;]+/).filter(Boolean);
  if (parts.length === 0) return "Give at least one level, e.g. 0.99.";
  const out = parts.map(Number);
  const bad = parts.find((p, i) => !(out[i] > 0 && out[i] < 1));
  return bad !== undefined ? `“${bad}” is not a level strictly between 0 and 1.` : out;
}

async function post<T>(op: string, body: unknown): Promise<T> {
  const res = await fetch(`/api/portal/explore/${op}`, { method: "POST", headers: { "content-type": "application/json", ...orgHeaders() }, body: JSON.stringify(body) });
  const data = await res.json().catch(() => ({}));
  if (!res.ok) throw Object.assign(new Error(data.detail ?? data.error ?? `The ${op} run failed (${res.status}).`), { problem: data as Problem });
  return data as T;
}

export function Explorer() {
  const editorId = useId();
  const [text, setText] = useState(pretty(TEMPLATES[0].model));
  const [levels, setLevels] = useState<string>(TEMPLATES[0].p);
  const [issues, setIssues] = useState<{ detail: string; pointer: string }[]>([]);
  const [levelError, setLevelError] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [results, setResults] = useState<Results | null>(null);
  const [copied, setCopied] = useState(false);

  function parseModel(): unknown | null {
    let value: unknown;
    try {
      value = JSON.parse(text);
    } catch (e) {
      setIssues([{ pointer: "", detail: `The model is not valid JSON: ${(e as Error).message}` }]);
      return null;
    }
    try {
      // The same validator the API runs, so messages match what the endpoint would say.
      validateModel(value);
      setIssues([]);
      return value;
    } catch (e) {
      setIssues(isCfError(e) ? e.issues : [{ pointer: "", detail: (e as Error).message }]);
      return null;
    }
  }

  async function run() {
    setError(null);
    const model = parseModel();
    const p = parseLevels(levels);
    setLevelError(typeof p === "string" ? p : null);
    if (model === null || typeof p === "string") {
      setResults(null); // never leave another model's results beside a model that does not run
      return;
    }
    setBusy(true);
    try {
      const [density, quantiles, moments] = await Promise.all([
        post<Results["density"]>("density", { model }),
        post<Results["quantiles"]>("quantiles", { model, p, expectedShortfall: true }),
        post<Results["moments"]>("moments", { model, order: 4 }),
      ]);
      setResults({ density, quantiles, moments });
    } catch (e) {
      const problem = (e as { problem?: Problem }).problem;
      if (problem?.errors?.length) setIssues(problem.errors.map((x) => ({ ...x, pointer: x.pointer.replace(/^\/model/, "") })));
      setError((e as Error).message);
      setResults(null);
    } finally {
      setBusy(false);
    }
  }

  const origin = typeof window === "undefined" ? "" : window.location.origin;
  const parsedLevels = parseLevels(levels);
  let curlModel = text;
  try {
    curlModel = JSON.stringify(JSON.parse(text));
  } catch {
    /* shown as typed */
  }
  const curl = `curl -sS -X POST ${origin}/api/v1/quantiles \\\n  -H "Authorization: Bearer $SUMFOLD_KEY" \\\n  -H "Content-Type: application/json" \\\n  -d '${`{"model":${curlModel},"p":[${typeof parsedLevels === "string" ? "" : parsedLevels.join(",")}],"expectedShortfall":true}`.replace(/'/g, "'\\''")}'`;
  const issuesId = `${editorId}-issues`;

  return (
    <div className="space-y-6">
      <PageHeader title="Explorer" lead="Build a model, then see its density, quantiles, expected shortfall and moments — computed by the same code as the API." />
      <section aria-labelledby="tpl-h">
        <h2 id="tpl-h" className="text-sm font-semibold uppercase tracking-wide text-ink-faint">Start from a template</h2>
        <div className="mt-2 grid gap-3 md:grid-cols-3">
          {TEMPLATES.map((t) => (
            <button
              key={t.id}
              type="button"
              className="rounded-xl border border-paper-line bg-white p-4 text-left hover:border-fold-500"
              onClick={() => {
                setText(pretty(t.model));
                setLevels(t.p);
                setIssues([]);
                setResults(null);
              }}
            >
              <span className="block font-display text-lg font-semibold">{t.title}</span>
              <span className="mt-1 block text-sm text-ink-soft">{t.blurb}</span>
            </button>
          ))}
        </div>
      </section>
      <div className="grid gap-6 lg:grid-cols-2">
        <div className="space-y-4">
          <ModelBuilder
            onBuild={(m) => {
              setText(pretty(m));
              setIssues([]);
            }}
          />
          <div>
            <label htmlFor={editorId} className="block text-sm font-semibold">
              Model (JSON)
            </label>
            <textarea
              id={editorId}
              className={`${inputClass} h-72 font-mono text-sm`}
              spellCheck={false}
              value={text}
              onChange={(e) => setText(e.target.value)}
              onBlur={() => parseModel()}
              aria-invalid={issues.length ? true : undefined}
              aria-describedby={issues.length ? issuesId : undefined}
            />
            {issues.length ? (
              <ul id={issuesId} className="mt-2 space-y-1 text-sm text-red-700">
                {issues.map((i, k) => (
                  <li key={k}>
                    {i.pointer ? <code className="mr-1 rounded bg-red-50 px-1 font-mono text-xs">{i.pointer}</code> : null}
                    {i.detail}
                  </li>
                ))}
              </ul>
            ) : null}
          </div>
          <div>
            <label className="block text-sm font-semibold" htmlFor={`${editorId}-p`}>
              Levels p for quantiles and expected shortfall
            </label>
            <input
              id={`${editorId}-p`}
              className={inputClass}
              value={levels}
              onChange={(e) => setLevels(e.target.value)}
              aria-invalid={levelError ? true : undefined}
              aria-describedby={levelError ? `${editorId}-p-err` : undefined}
            />
            {levelError ? <p id={`${editorId}-p-err`} className="mt-1 text-sm text-red-700">{levelError}</p> : null}
          </div>
          <button type="button" className={buttonClass} onClick={run} disabled={busy}>
            {busy ? "Computing…" : "Run density, quantiles and moments"}
          </button>
        </div>
        <div className="space-y-4">
          <FormError message={error} />
          {busy ? <Loading label="Computing…" /> : null}
          {!results && !busy && !error ? (
            <p className="rounded-xl border border-dashed border-paper-line bg-paper-warm p-6 text-sm text-ink-soft">Results appear here: the density and distribution function, a table of quantiles and expected shortfall, the moments, and the diagnostics of the inversion.</p>
          ) : null}
          {results ? (
            <>
              <ResultChart data={results.density} />
              <section aria-labelledby="q-h" className="rounded-xl border border-paper-line bg-white p-4">
                <h2 id="q-h" className="font-display text-lg font-semibold">Quantiles and expected shortfall</h2>
                <table className="mt-2 w-full text-sm">
                  <thead className="text-left text-xs uppercase text-ink-faint">
                    <tr>
                      <th scope="col" className="py-1">p</th>
                      <th scope="col" className="py-1 text-right">Quantile (VaR)</th>
                      <th scope="col" className="py-1 text-right">Expected shortfall</th>
                    </tr>
                  </thead>
                  <tbody className="tabular-nums">
                    {results.quantiles.p.map((p, i) => (
                      <tr key={p} className="border-t border-paper-line">
                        <td className="py-1">{p}</td>
                        <td className="py-1 text-right">{num(results.quantiles.x[i])}</td>
                        <td className="py-1 text-right">{num(results.quantiles.expectedShortfall?.[i])}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </section>
              <section aria-labelledby="m-h" className="rounded-xl border border-paper-line bg-white p-4">
                <h2 id="m-h" className="font-display text-lg font-semibold">Moments</h2>
                <dl className="mt-2 grid grid-cols-2 gap-x-4 gap-y-1 text-sm tabular-nums">
                  <dt className="text-ink-faint">Mean</dt><dd>{num(results.moments.mean)}</dd>
                  <dt className="text-ink-faint">Variance</dt><dd>{num(results.moments.variance)}</dd>
                  <dt className="text-ink-faint">Skewness</dt><dd>{num(results.moments.skewness)}</dd>
                  <dt className="text-ink-faint">Excess kurtosis</dt><dd>{num(results.moments.excessKurtosis)}</dd>
                </dl>
                {results.moments.notes?.length ? <ul className="mt-2 list-disc pl-5 text-sm text-ink-soft">{results.moments.notes.map((n) => <li key={n}>{n}</li>)}</ul> : null}
              </section>
              <details className="rounded-xl border border-paper-line bg-white p-4 text-sm">
                <summary className="cursor-pointer font-semibold">Diagnostics of the inversion</summary>
                <pre className="mt-2 overflow-x-auto font-mono text-xs">{pretty(results.density.diagnostics)}</pre>
              </details>
            </>
          ) : null}
          <section aria-labelledby="curl-h" className="rounded-xl border border-paper-line bg-ink p-4 text-paper">
            <div className="flex items-center justify-between gap-2">
              <h2 id="curl-h" className="text-sm font-semibold">The same quantiles from your code</h2>
              <button
                type="button"
                className={`${quietButtonClass} !bg-transparent !text-paper`}
                onClick={() => navigator.clipboard.writeText(curl).then(() => setCopied(true), () => setCopied(false))}
              >
                {copied ? "Copied" : "Copy"}
              </button>
            </div>
            <pre className="mt-2 overflow-x-auto font-mono text-xs" data-testid="curl">{curl}</pre>
          </section>
        </div>
      </div>
    </div>
  );
}
