"use client";

import type { VersionJson } from "./types";
import { fmtNum } from "./types";

export function SummaryTable({ v }: { v: VersionJson }) {
  const s = v.summary;
  const rows: [string, string, string?][] = [
    ["n", fmtNum(s.n), s.weightKind === "counts" ? `sum of counts over ${fmtNum(s.rows)} rows` : s.weightKind === "weights" ? `sum of weights over ${fmtNum(s.rows)} rows` : undefined],
    ["Mean", fmtNum(s.mean)],
    ["Standard deviation", fmtNum(s.sd), s.sdDivisor === "n-1" ? "of the sample (divisor n − 1)" : "of the weighted law (the one a model uses)"],
    // A model { "dataset": … } is the empirical law of the values, whose variance divides by n, not n − 1.
    ...(s.sdDivisor === "n-1" && s.sd !== null && s.n >= 2
      ? ([["Sd of the empirical law", fmtNum(s.sd * Math.sqrt((s.n - 1) / s.n)), "divisor n: what a model built on this dataset has"]] as [string, string, string][])
      : []),
    ["Minimum", fmtNum(s.min)],
    ["Lower quartile", fmtNum(s.q1), s.quartileRule === "type 7" ? "linear interpolation (type 7)" : "inverse of the weighted CDF"],
    ["Median", fmtNum(s.median)],
    ["Upper quartile", fmtNum(s.q3)],
    ["Maximum", fmtNum(s.max)],
    ["Skewness", fmtNum(s.skewness), "g1 = m3 / m2^1.5"],
    ["Excess kurtosis", fmtNum(s.kurtosis), "g2 = m4 / m2² − 3"],
  ];
  return (
    <table className="w-full text-sm">
      <caption className="sr-only">Summary statistics of version {v.version}</caption>
      <tbody>
        {rows.map(([k, val, note]) => (
          <tr key={k} className="border-b border-paper-line last:border-0">
            <th scope="row" className="py-1.5 pr-4 text-left font-semibold text-ink-soft">
              {k}
            </th>
            <td className="py-1.5 pr-4 text-right font-mono tabular-nums" data-stat={k}>
              {val}
            </td>
            <td className="py-1.5 text-xs text-ink-faint">{note ?? ""}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
