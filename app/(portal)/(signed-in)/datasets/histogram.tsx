"use client";

import type { Histogram } from "@/lib/datasets/stats";
import { fmtNum } from "./types";

/** A small bar chart of the stored histogram (equal-width bins from min to max). */
export function HistogramPreview({ h, label }: { h: Histogram; label: string }) {
  if (h.counts.length === 0) return null;
  const W = 560;
  const H = 160;
  const top = Math.max(...h.counts);
  const bw = W / h.counts.length;
  return (
    <figure className="rounded-lg border border-paper-line bg-white p-3">
      <svg viewBox={`0 0 ${W} ${H + 18}`} role="img" aria-label={`Histogram of ${label}: ${h.counts.length} bins from ${fmtNum(h.edges[0])} to ${fmtNum(h.edges[h.edges.length - 1])}`} className="h-auto w-full">
        {h.counts.map((c, i) => {
          const bh = top > 0 ? (c / top) * H : 0;
          return (
            <rect key={i} x={i * bw + 0.5} y={H - bh} width={Math.max(0.5, bw - 1)} height={bh} className="fill-fold-500">
              <title>{`${fmtNum(h.edges[i])} to ${fmtNum(h.edges[i + 1])}: ${fmtNum(c)}`}</title>
            </rect>
          );
        })}
        <line x1={0} x2={W} y1={H} y2={H} className="stroke-ink-faint" />
        <text x={0} y={H + 14} className="fill-ink-soft text-[11px]">
          {fmtNum(h.edges[0])}
        </text>
        <text x={W} y={H + 14} textAnchor="end" className="fill-ink-soft text-[11px]">
          {fmtNum(h.edges[h.edges.length - 1])}
        </text>
      </svg>
    </figure>
  );
}
