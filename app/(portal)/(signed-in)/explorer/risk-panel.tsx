"use client";

import { useEffect, useId, useState } from "react";
import { orgHeaders } from "../../_components/fetch";
import { buttonClass, FormError, inputClass, Loading } from "../../_components/ui";

interface Measure {
  value: (number | null)[];
  error: (number | null)[];
}
interface RiskResult {
  var?: Measure;
  es?: Measure;
  stopLoss?: Measure;
  layerMean?: Measure;
  exceedance?: Measure;
  returnPeriod?: Measure;
  outside?: { value: number; ppm: number; error: number };
  notes: string[];
  diagnostics: { method: string; cdfError: number | null };
}

const fmt = (v: number | null | undefined) => (v === null || v === undefined ? "does not exist" : Number(v.toPrecision(7)).toString());
const fmtErr = (v: number | null | undefined) => (v === null || v === undefined ? "no bound" : `± ${v.toExponential(1)}`);

/** Numbers separated by commas or spaces; null when a value is not a finite number. */
function numbers(s: string): number[] | null {
  const parts = s.split(/[\s,;]+/).filter(Boolean);
  const out = parts.map(Number);
  return out.every(Number.isFinite) ? out : null;
}

async function runRisk(body: unknown): Promise<RiskResult> {
  const res = await fetch("/api/portal/explore/risk", { method: "POST", headers: { "content-type": "application/json", ...orgHeaders() }, body: JSON.stringify(body) });
  const data = await res.json().catch(() => ({}));
  if (!res.ok) {
    const first = data.errors?.[0];
    throw new Error(first ? `${first.pointer ? `${first.pointer}: ` : ""}${first.detail}` : (data.detail ?? data.error ?? `The risk run failed (${res.status}).`));
  }
  return data as RiskResult;
}

/** Exceedance P(S > x) on a log scale, with the return period 1/P on the right-hand axis. */
function ExceedanceCurve({ xs, ps }: { xs: number[]; ps: (number | null)[] }) {
  const pts = xs.map((x, i) => ({ x, p: ps[i] })).filter((d): d is { x: number; p: number } => d.p !== null && d.p > 0);
  if (pts.length < 2) return null;
  const W = 520;
  const H = 240;
  const L = 56;
  const R = 64;
  const T = 12;
  const B = 32;
  const x0 = pts[0].x;
  const x1 = pts[pts.length - 1].x;
  const lo = Math.floor(Math.log10(Math.min(...pts.map((d) => d.p))));
  const hi = 0;
  const sx = (x: number) => L + ((x - x0) / (x1 - x0 || 1)) * (W - L - R);
  const sy = (p: number) => T + ((hi - Math.log10(p)) / (hi - lo || 1)) * (H - T - B);
  const decades = Array.from({ length: hi - lo + 1 }, (_, k) => hi - k);
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="w-full" role="img" aria-label="Exceedance probability on a log scale, with return periods on the right axis">
      {decades.map((d) => (
        <g key={d}>
          <line x1={L} x2={W - R} y1={sy(10 ** d)} y2={sy(10 ** d)} stroke="#e5e2da" />
          <text x={L - 6} y={sy(10 ** d) + 4} fontSize="10" textAnchor="end">{`1e${d}`}</text>
          <text x={W - R + 6} y={sy(10 ** d) + 4} fontSize="10">{d === 0 ? "1" : `${10 ** -d}`}</text>
        </g>
      ))}
      <polyline fill="none" stroke="#1f6f5c" strokeWidth="2" points={pts.map((d) => `${sx(d.x)},${sy(d.p)}`).join(" ")} />
      <text x={L} y={H - 8} fontSize="10">{Number(x0.toPrecision(4))}</text>
      <text x={W - R} y={H - 8} fontSize="10" textAnchor="end">{Number(x1.toPrecision(4))}</text>
      <text x={4} y={T + 8} fontSize="10">P(S &gt; x)</text>
      <text x={W - 4} y={T + 8} fontSize="10" textAnchor="end">years</text>
    </svg>
  );
}

/** The explorer's risk panel: VaR/ES in either tail, stop-loss, a layer, return periods, exceedance curve, ppm outside spec. */
export interface RiskPreset {
  /** changes whenever a template is loaded, so the same template loaded twice resets the fields again */
  key: string;
  tail: "upper" | "lower";
  levels: string;
  retentions: string;
  spec: string;
}

export function RiskPanel({ modelText, preset }: { modelText: string; preset?: RiskPreset | null }) {
  const id = useId();
  const [tail, setTail] = useState<"upper" | "lower">(preset?.tail ?? "upper");
  const [levels, setLevels] = useState(preset?.levels ?? "0.99, 0.995");
  const [retentions, setRetentions] = useState(preset?.retentions ?? "");
  const [layer, setLayer] = useState("");
  const [periods, setPeriods] = useState("10, 100, 200");
  const [spec, setSpec] = useState(preset?.spec ?? "");
  const [busy, setBusy] = useState(false);
  const [runs, setRuns] = useState(0);
  const [error, setError] = useState<string | null>(null);
  const [result, setResult] = useState<{ r: RiskResult; curve: { xs: number[]; r: RiskResult } | null; p: number[]; d: number[]; T: number[]; layer: number[] | null; tail: "upper" | "lower" } | null>(null);
  // a template brings its own tail, levels, retentions and spec limits (the tolerance stack its LSL/USL)
  useEffect(() => {
    if (!preset) return;
    setTail(preset.tail);
    setLevels(preset.levels);
    setRetentions(preset.retentions);
    setSpec(preset.spec);
    setLayer("");
    setResult(null);
    setError(null);
  }, [preset]);

  async function run() {
    setError(null);
    let model: unknown;
    try {
      model = JSON.parse(modelText);
    } catch (e) {
      setError(`The model is not valid JSON: ${(e as Error).message}`);
      return;
    }
    const p = numbers(levels);
    const d = numbers(retentions);
    const T = numbers(periods);
    const l = numbers(layer);
    const s = numbers(spec);
    if (!p || p.length === 0 || p.some((x) => !(x > 0 && x < 1))) return setError("Levels must be numbers strictly between 0 and 1, e.g. 0.99 (or 0.01 for the lower tail).");
    if (!d) return setError("Retentions must be numbers.");
    if (!T || T.some((x) => !(x > 1))) return setError("Return periods must be numbers greater than 1.");
    if (!l || (l.length !== 0 && (l.length !== 2 || !(l[1] > 0)))) return setError("The aggregate layer is two numbers: deductible and limit (limit > 0).");
    if (!s || (s.length !== 0 && (s.length !== 2 || !(s[1] > s[0])))) return setError("Spec limits are two numbers: lower and upper (upper > lower).");
    const body: Record<string, unknown> = { model, var: { p, tail }, es: { p, tail } };
    if (d.length) body.stopLoss = d;
    if (T.length) body.returnPeriod = T;
    if (l.length) body.layerMean = [{ deductible: l[0], limit: l[1] }];
    if (s.length === 2) body.outside = { lsl: s[0], usl: s[1] };
    setBusy(true);
    // no stale figures beside a new run's inputs
    setResult(null);
    try {
      const r = await runRisk(body);
      // the exceedance curve from the median to the 1-in-10000 level
      let curve: { xs: number[]; r: RiskResult } | null = null;
      const ends = await runRisk({ model, returnPeriod: [2, 10000] });
      const a = ends.returnPeriod?.value[0];
      const b = ends.returnPeriod?.value[1];
      if (a !== null && a !== undefined && b !== null && b !== undefined && b > a) {
        const xs = Array.from({ length: 41 }, (_, k) => a + ((b - a) * k) / 40);
        curve = { xs, r: await runRisk({ model, exceedance: xs }) };
      }
      setResult({ r, curve, p, d, T, layer: l.length ? l : null, tail });
      setRuns((n) => n + 1);
    } catch (e) {
      setError((e as Error).message);
      setResult(null);
    } finally {
      setBusy(false);
    }
  }

  return (
    <section aria-labelledby={`${id}-h`} className="rounded-xl border border-paper-line bg-white p-4">
      <h2 id={`${id}-h`} className="font-display text-lg font-semibold">Risk measures</h2>
      <p className="text-sm text-ink-soft">
        Values come with their error bounds. Results are computational aids: decisions on capital, reserves or tolerances rest with licensed
        practice and local regulation.
      </p>
      <div className="mt-3 grid gap-2 md:grid-cols-2">
        <fieldset className="text-sm">
          <legend className="font-semibold">Tail</legend>
          <label className="mr-3">
            <input type="radio" name={`${id}-tail`} checked={tail === "upper"} onChange={() => setTail("upper")} /> upper (losses, p near 1)
          </label>
          <label>
            <input type="radio" name={`${id}-tail`} checked={tail === "lower"} onChange={() => setTail("lower")} /> lower (returns, p near 0)
          </label>
        </fieldset>
        <label className="text-sm" htmlFor={`${id}-p`}>
          VaR and ES levels
          <input id={`${id}-p`} className={inputClass} value={levels} onChange={(e) => setLevels(e.target.value)} />
        </label>
        <label className="text-sm" htmlFor={`${id}-d`}>
          Stop-loss retentions
          <input id={`${id}-d`} className={inputClass} value={retentions} onChange={(e) => setRetentions(e.target.value)} placeholder="e.g. 500, 800" />
        </label>
        <label className="text-sm" htmlFor={`${id}-l`}>
          Aggregate layer (deductible, limit)
          <input id={`${id}-l`} className={inputClass} value={layer} onChange={(e) => setLayer(e.target.value)} placeholder="e.g. 500, 300" />
        </label>
        <label className="text-sm" htmlFor={`${id}-T`}>
          Return periods (years)
          <input id={`${id}-T`} className={inputClass} value={periods} onChange={(e) => setPeriods(e.target.value)} />
        </label>
        <label className="text-sm" htmlFor={`${id}-s`}>
          Spec limits (lower, upper) for ppm outside
          <input id={`${id}-s`} className={inputClass} value={spec} onChange={(e) => setSpec(e.target.value)} placeholder="e.g. 63.92, 64.08" />
        </label>
      </div>
      <button type="button" className={`${buttonClass} mt-3`} onClick={run} disabled={busy}>
        {busy ? "Computing…" : "Compute risk measures"}
      </button>
      <FormError message={error} />
      {busy ? <Loading label="Computing…" /> : null}
      {result ? (
        <div className="mt-3 space-y-3" data-testid="risk-result" data-run={runs}>
          <table className="w-full text-sm">
            <thead>
              <tr className="text-left text-ink-faint">
                <th>measure</th>
                <th className="text-right">value</th>
                <th className="text-right">error bound</th>
              </tr>
            </thead>
            <tbody>
              {result.p.map((p, i) => (
                <tr key={`v${p}`}>
                  <td>VaR {p} ({result.tail})</td>
                  <td className="text-right">{fmt(result.r.var?.value[i])}</td>
                  <td className="text-right">{fmtErr(result.r.var?.error[i])}</td>
                </tr>
              ))}
              {result.p.map((p, i) => (
                <tr key={`e${p}`}>
                  <td>ES {p} ({result.tail})</td>
                  <td className="text-right">{fmt(result.r.es?.value[i])}</td>
                  <td className="text-right">{fmtErr(result.r.es?.error[i])}</td>
                </tr>
              ))}
              {result.d.map((d, i) => (
                <tr key={`s${d}`}>
                  <td>stop-loss E[(S − {d})+]</td>
                  <td className="text-right">{fmt(result.r.stopLoss?.value[i])}</td>
                  <td className="text-right">{fmtErr(result.r.stopLoss?.error[i])}</td>
                </tr>
              ))}
              {result.layer ? (
                <tr>
                  <td>
                    layer {result.layer[1]} xs {result.layer[0]}
                  </td>
                  <td className="text-right">{fmt(result.r.layerMean?.value[0])}</td>
                  <td className="text-right">{fmtErr(result.r.layerMean?.error[0])}</td>
                </tr>
              ) : null}
              {result.T.map((T, i) => (
                <tr key={`T${T}`}>
                  <td>1-in-{T} level</td>
                  <td className="text-right">{fmt(result.r.returnPeriod?.value[i])}</td>
                  <td className="text-right">{fmtErr(result.r.returnPeriod?.error[i])}</td>
                </tr>
              ))}
              {result.r.outside ? (
                <tr>
                  <td>outside spec limits</td>
                  <td className="text-right">{fmt(result.r.outside.ppm)} ppm</td>
                  <td className="text-right">{fmtErr(result.r.outside.error * 1e6)} ppm</td>
                </tr>
              ) : null}
            </tbody>
          </table>
          {result.curve ? <ExceedanceCurve xs={result.curve.xs} ps={result.curve.r.exceedance?.value ?? []} /> : null}
          {result.r.notes.length ? (
            <ul className="list-disc pl-5 text-xs text-ink-soft">
              {result.r.notes.map((n) => (
                <li key={n}>{n}</li>
              ))}
            </ul>
          ) : null}
        </div>
      ) : null}
    </section>
  );
}
