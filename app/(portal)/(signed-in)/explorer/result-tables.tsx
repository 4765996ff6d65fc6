"use client";

import type { Results } from "./run";

const num = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? "does not exist" : Number(v.toPrecision(8)).toString());
/** a typed array of error bounds from the diagnostics (null entries: no bound derived) */
const numbers = (v: unknown) => (Array.isArray(v) ? (v as (number | null)[]) : undefined);
const pretty = (v: unknown) => JSON.stringify(v, null, 2);
/** a moment's error bound, shown beside it ("no bound" where the engine derived none) */
const bound = (v: number | null | undefined, e: number | null | undefined) =>
  v === null || v === undefined || !Number.isFinite(v) ? null : e === null || e === undefined ? "no bound" : `± ${Number(e.toPrecision(2))}`;

/** Quantiles with expected shortfall, moments, and the inversion's diagnostics. */
export function ResultTables({ results }: { results: Results }) {
  const { quantiles: q, moments: m } = results;
  const qErr = numbers(q.diagnostics.quantileError);
  const esErr = numbers(q.diagnostics.expectedShortfallError);
  // the notes that say a bound is partly estimated or a tolerance was missed: shown beside the table, not only in the JSON
  const qNotes = Array.isArray(q.diagnostics.notes) ? (q.diagnostics.notes as unknown[]).filter((n): n is string => typeof n === "string") : [];
  const caveats = qNotes.filter((n) => /estimat|not reached/i.test(n));
  return (
    <>
      <section aria-labelledby="q-h" className="rounded-xl border border-paper-line bg-white p-4">
        <h2 id="q-h" className="font-display text-lg font-semibold">Quantiles and expected shortfall</h2>
        <p className="text-xs text-ink-faint">Each value with a bound on its absolute error (± , from the cdf bound and the density over the bracket).</p>
        <table className="mt-2 w-full text-sm">
          <thead className="text-left text-xs uppercase text-ink-faint">
            <tr>
              <th scope="col" className="py-1">p</th>
              <th scope="col" className="py-1 text-right">Quantile (VaR)</th>
              <th scope="col" className="py-1 pl-2 text-left">
                <span className="sr-only">Quantile error bound</span>
              </th>
              <th scope="col" className="py-1 text-right">Expected shortfall</th>
              <th scope="col" className="py-1 pl-2 text-left">
                <span className="sr-only">Expected shortfall error bound</span>
              </th>
            </tr>
          </thead>
          <tbody className="tabular-nums">
            {q.p.map((p, i) => (
              <tr key={p} className="border-t border-paper-line">
                <td className="py-1">{p}</td>
                <td className="py-1 text-right">{num(q.x[i])}</td>
                <td className="py-1 pl-2 text-left text-xs text-ink-faint">{bound(q.x[i], qErr?.[i])}</td>
                <td className="py-1 text-right">{num(q.expectedShortfall?.[i])}</td>
                <td className="py-1 pl-2 text-left text-xs text-ink-faint">{bound(q.expectedShortfall?.[i], esErr?.[i])}</td>
              </tr>
            ))}
          </tbody>
        </table>
        {caveats.length ? (
          <div role="note" data-testid="bound-caveats" className="mt-3 rounded-lg border border-caution-500/40 bg-caution-50 p-3 text-xs text-caution-700">
            <p className="font-semibold">Where these bounds are not fully derived</p>
            <ul className="mt-1 list-disc pl-5">
              {caveats.map((n) => (
                <li key={n}>{n}</li>
              ))}
            </ul>
          </div>
        ) : null}
      </section>
      <section aria-labelledby="m-h" className="rounded-xl border border-paper-line bg-white p-4">
        <h2 id="m-h" className="font-display text-lg font-semibold">Moments</h2>
        <p className="text-xs text-ink-faint">Each value with a bound on its absolute error (± , derived from the arithmetic).</p>
        <dl className="mt-2 grid grid-cols-[auto_auto_1fr] gap-x-4 gap-y-1 text-sm tabular-nums">
          <dt className="text-ink-faint">Mean</dt>
          <dd>{num(m.mean)}</dd>
          <dd className="text-ink-faint">{bound(m.mean, m.meanError)}</dd>
          <dt className="text-ink-faint">Variance</dt>
          <dd>{num(m.variance)}</dd>
          <dd className="text-ink-faint">{bound(m.variance, m.varianceError)}</dd>
          <dt className="text-ink-faint">Skewness</dt>
          <dd>{num(m.skewness)}</dd>
          <dd className="text-ink-faint">{bound(m.skewness, m.skewnessError)}</dd>
          <dt className="text-ink-faint">Excess kurtosis</dt>
          <dd>{num(m.excessKurtosis)}</dd>
          <dd className="text-ink-faint">{bound(m.excessKurtosis, m.excessKurtosisError)}</dd>
        </dl>
        {m.notes?.length ? (
          <ul className="mt-2 list-disc pl-5 text-sm text-ink-soft">
            {m.notes.map((n) => (
              <li key={n}>{n}</li>
            ))}
          </ul>
        ) : null}
      </section>
      <details className="rounded-xl border border-paper-line bg-white p-4 text-sm">
        <summary className="cursor-pointer font-semibold">Diagnostics of the inversion</summary>
        <pre className="mt-2 overflow-x-auto font-mono text-xs">{pretty(results.density.diagnostics)}</pre>
      </details>
    </>
  );
}
