"use client";

import { useSearchParams } from "next/navigation";
import { useEffect, useId, useRef, useState } from "react";
import { endpointExamples } from "@/lib/api/examples";
import { has, useMe } from "../../_components/me";
import { portalFetch } from "../../_components/fetch";
import { buttonClass, FormError, inputClass, Loading, PageHeader } from "../../_components/ui";
import { CodeSnippets } from "./code-snippets";
import { JobRun } from "./job-run";
import { LawPlot } from "./law-plot";
import { ModelBuilder, type BuilderFamily } from "./model-builder";
import { ModelEditor } from "./model-editor";
import { ResultTables } from "./result-tables";
import { densityOnRange, parseLevels, runAll, RunError, type FieldIssue, type Results } from "./run";
import { SaveModel, type SavedModelVersion } from "./save-model";
import { LayerControl } from "./layer-control";
import { RiskPanel, type RiskPreset } from "./risk-panel";
import { TEMPLATES } from "./templates";

const pretty = (v: unknown) => JSON.stringify(v, null, 2);
const DEFAULT_RANGE = { from: 0.0001, to: 0.9999 };

/** The risk fields of the template the page opens with. */
const FIRST_PRESET: RiskPreset = { key: "first", ...TEMPLATES[0].risk };

/** The explorer: a model (template, builder, docs example or saved model) in, the law's plot, quantiles and moments out. */
export function Explorer({ builderFamilies }: { builderFamilies: BuilderFamily[] }) {
  const { me } = useMe();
  const search = useSearchParams();
  const levelsId = useId();
  const [text, setText] = useState(pretty(TEMPLATES[0].model));
  const [levels, setLevels] = useState<string>(TEMPLATES[0].p);
  const [issues, setIssues] = useState<FieldIssue[]>([]);
  const [levelError, setLevelError] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [replotting, setReplotting] = useState(false);
  const [results, setResults] = useState<Results | null>(null);
  const [loaded, setLoaded] = useState<{ id: number; name: string; version: number } | null>(null);
  const [riskPreset, setRiskPreset] = useState<RiskPreset | null>(null);
  const loadTemplate = (t: (typeof TEMPLATES)[number]) => {
    load(t.model, t.p);
    setRiskPreset({ key: `${t.id}-${Date.now()}`, ...t.risk });
  };
  const ranModel = useRef<unknown>(null);
  // a model past a request's deadline is offered as a job on the queue
  const [heavy, setHeavy] = useState<{ model: unknown; p: number[] } | null>(null);
  const pending = useRef<{ model: unknown; p: number[] } | null>(null);

  function load(model: unknown, p?: string) {
    setText(pretty(model));
    if (p) setLevels(p);
    setIssues([]);
    setError(null);
    setResults(null);
  }

  // A docs example (?example=quantiles) or a saved model (?model=12&version=2) opens ready to run.
  const example = search.get("example");
  const savedId = search.get("model");
  const savedVersion = search.get("version");
  useEffect(() => {
    if (example) {
      const t = TEMPLATES.find((x) => x.id === example);
      const e = endpointExamples.find((x) => x.id === example);
      const body = e?.body as { model?: unknown; p?: number[] } | null;
      if (t) loadTemplate(t);
      else if (body?.model) load(body.model, body.p?.join(", "));
      else setError(`There is no docs example “${example}” with a model.`);
    }
  }, [example]);
  useEffect(() => {
    if (!savedId) return;
    portalFetch<{ model: { id: number; name: string }; version: SavedModelVersion }>(`/api/portal/models/${encodeURIComponent(savedId)}${savedVersion ? `?version=${encodeURIComponent(savedVersion)}` : ""}`)
      .then((r) => {
        load(r.version.model, r.version.levels ?? undefined);
        setLoaded({ id: r.model.id, name: r.model.name, version: r.version.version });
      })
      .catch((e: RunError) => setError(e.message));
  }, [savedId, savedVersion]);

  function parseModel(): unknown | null {
    try {
      return JSON.parse(text);
    } catch (e) {
      setIssues([{ pointer: "", detail: `The model is not valid JSON: ${(e as Error).message}` }]);
      return null;
    }
  }

  function fail(e: unknown) {
    const problem = e instanceof RunError ? e.problem : {};
    setIssues(problem.errors?.length ? problem.errors.map((x) => ({ ...x, pointer: x.pointer.replace(/^\/model/, "") })) : []);
    setError((e as Error).message);
    if ((problem as { type?: string }).type?.endsWith("#compute_budget_exceeded") && pending.current) setHeavy(pending.current);
    // never leave another model's results beside an error
    setResults(null);
  }

  async function run() {
    setError(null);
    setIssues([]);
    const model = parseModel();
    const p = parseLevels(levels);
    setLevelError(typeof p === "string" ? p : null);
    if (model === null || typeof p === "string") {
      setResults(null);
      return;
    }
    setBusy(true);
    setResults(null);
    setHeavy(null);
    pending.current = { model, p };
    try {
      // The server validates (the same schemas as the public API, datasets resolved in this organisation).
      setResults(await runAll(model, p, results?.range ?? DEFAULT_RANGE));
      ranModel.current = model;
    } catch (e) {
      fail(e);
    } finally {
      setBusy(false);
    }
  }

  async function replot(range: { from: number; to: number }) {
    if (!results) return;
    setReplotting(true);
    try {
      const density = await densityOnRange(ranModel.current, range);
      setResults({ ...results, density, range });
    } catch (e) {
      fail(e);
    } finally {
      setReplotting(false);
    }
  }

  if (me && !has(me, "explore")) {
    return (
      <div className="space-y-4">
        <PageHeader title="Explorer" lead="Models are run by developers and admins." />
        <p className="text-ink-soft">Billing contacts follow usage and the plan; the explorer, whose runs use the organisation's compute, is for developers and admins.</p>
      </div>
    );
  }

  const parsedLevels = parseLevels(levels);
  let bodyModel: unknown = text;
  try {
    bodyModel = JSON.parse(text);
  } catch {
    /* shown as typed */
  }
  const snippetBody = { model: bodyModel, p: typeof parsedLevels === "string" ? [] : parsedLevels, expectedShortfall: true };

  return (
    <div className="space-y-6">
      <PageHeader title="Explorer" lead="Build a model, then see its density, quantiles, expected shortfall and moments — computed by the same code as the API." />
      <section aria-labelledby="tpl-h">
        <h2 id="tpl-h" className="text-sm font-semibold uppercase tracking-wide text-ink-faint">Start from a template</h2>
        <div className="mt-2 grid gap-3 md:grid-cols-3">
          {TEMPLATES.map((t) => (
            <button key={t.id} type="button" className="rounded-xl border border-paper-line bg-white p-4 text-left hover:border-fold-500" onClick={() => { loadTemplate(t); setLoaded(null); }}>
              <span className="block font-display text-lg font-semibold">{t.title}</span>
              <span className="mt-1 block text-sm text-ink-soft">{t.blurb}</span>
            </button>
          ))}
        </div>
      </section>
      <div className="grid gap-6 lg:grid-cols-2">
        <div className="min-w-0 space-y-4">
          <ModelBuilder families={builderFamilies} onBuild={(m) => { setText(pretty(m)); setIssues([]); }} />
          <ModelEditor text={text} onChange={setText} issues={issues} />
          <LayerControl text={text} onApply={setText} />
          <div>
            <label className="block text-sm font-semibold" htmlFor={levelsId}>
              Levels p for quantiles and expected shortfall
            </label>
            <input id={levelsId} className={inputClass} value={levels} onChange={(e) => setLevels(e.target.value)} aria-invalid={levelError ? true : undefined} aria-describedby={levelError ? `${levelsId}-err` : undefined} />
            {levelError ? <p id={`${levelsId}-err`} className="mt-1 text-sm text-red-700">{levelError}</p> : null}
          </div>
          <button type="button" className={buttonClass} onClick={run} disabled={busy}>
            {busy ? "Computing…" : "Run density, quantiles and moments"}
          </button>
          <SaveModel text={text} levels={levels} loaded={loaded} onSaved={setLoaded} />
        </div>
        <div className="min-w-0 space-y-4">
          <FormError message={error} />
          {heavy ? (
            <JobRun
              bodies={{ density: { model: heavy.model }, quantiles: { model: heavy.model, p: heavy.p, expectedShortfall: true }, moments: { model: heavy.model, order: 4 } }}
              onDone={(r) => {
                setResults({ ...(r as unknown as Omit<Results, "range">), range: DEFAULT_RANGE });
                ranModel.current = heavy.model;
                setHeavy(null);
                setError(null);
              }}
            />
          ) : null}
          {busy ? <Loading label="Computing…" /> : null}
          {!results && !busy && !error ? (
            <p className="rounded-xl border border-dashed border-paper-line bg-paper-warm p-6 text-sm text-ink-soft">Results appear here: the law plotted between two quantiles, a table of quantiles and expected shortfall, the moments, and the diagnostics of the inversion.</p>
          ) : null}
          {results ? (
            <>
              <LawPlot data={results.density} range={results.range} onRange={replot} busy={replotting} />
              <ResultTables results={results} />
            </>
          ) : null}
          <CodeSnippets path="/api/v1/quantiles" body={snippetBody} title="The same quantiles from your code" />
        </div>
      </div>
      <RiskPanel modelText={text} preset={riskPreset ?? FIRST_PRESET} />
    </div>
  );
}
