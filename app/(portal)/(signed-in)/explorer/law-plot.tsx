"use client";

import { useEffect, useId, useMemo, useRef, useState } from "react";
import { formatNumber, LOG_FLOOR, makeAxis, nearestRow, plotCsv, plotRows, withBound, yOf, type AxisKind, type LawTable, type PlotView } from "@/lib/portal/plot";
import { quietButtonClass } from "../../_components/ui";

const HEIGHT = 320;
const M = { top: 14, right: 26, bottom: 58, left: 64 };
const COLORS = { curve: "#1b8a7a", atom: "#b7791f", grid: "#e2ddd0", ink: "#17202e", faint: "#6b7280" };
const VIEWS: { id: PlotView; label: string }[] = [
  { id: "density", label: "Density" },
  { id: "cdf", label: "Distribution F" },
  { id: "exceedance", label: "Exceedance 1 − F" },
];

function download(name: string, blob: Blob) {
  const a = document.createElement("a");
  a.href = URL.createObjectURL(blob);
  a.download = name;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(a.href), 1000);
}

/** Segments of a polyline, broken where a point cannot be drawn (null, or not positive on a log axis). */
function paths(points: ([number, number] | null)[]): string {
  let d = "";
  let pen = false;
  for (const p of points) {
    if (!p) {
      pen = false;
      continue;
    }
    d += `${pen ? "L" : "M"}${p[0].toFixed(1)},${p[1].toFixed(1)}`;
    pen = true;
  }
  return d;
}

/**
 * The law on its quantile range: density (pdf, or pmf on a lattice), distribution function or exceedance
 * 1 - F, on linear or log axes, atoms as markers with their mass, a hover read-out, and export of the plotted
 * table (CSV) and the figure (SVG, PNG).
 */
export function LawPlot({ data, range, onRange, busy }: { data: LawTable; range: { from: number; to: number }; onRange: (r: { from: number; to: number }) => void; busy?: boolean }) {
  const id = useId();
  const box = useRef<HTMLDivElement>(null);
  const svg = useRef<SVGSVGElement>(null);
  const [width, setWidth] = useState(640);
  const [view, setView] = useState<PlotView>("density");
  const [xKind, setXKind] = useState<AxisKind>("linear");
  const [yKind, setYKind] = useState<AxisKind>("linear");
  const [hover, setHover] = useState<number | null>(null);
  const [from, setFrom] = useState(String(range.from));
  const [to, setTo] = useState(String(range.to));
  const [rangeError, setRangeError] = useState<string | null>(null);

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const ro = new ResizeObserver(([e]) => setWidth(Math.max(280, Math.floor(e.contentRect.width))));
    ro.observe(el);
    return () => ro.disconnect();
  }, []);
  // The exceedance view is read on a log scale; the others start linear (set with the view, in the same render).
  const chooseView = (v: PlotView) => {
    setView(v);
    setYKind(v === "exceedance" ? "log" : "linear");
  };

  const rows = useMemo(() => plotRows(data), [data]);
  const dLabel = data.pdf ? "pdf" : "pmf";
  const xCanLog = rows.length > 0 && rows[rows.length - 1].x > 0;
  const xk: AxisKind = xKind === "log" && xCanLog ? "log" : "linear";
  const drawn = xk === "log" ? rows.filter((r) => r.x > 0) : rows;
  const ys = drawn.map((r) => yOf(view, r) ?? NaN);
  const atoms = data.atoms.filter((a) => !drawn.length || (a.x >= drawn[0].x && a.x <= drawn[drawn.length - 1].x));
  // atoms off the plotted range (far from it, or at x <= 0 on a log x axis) are named under the caption, not dropped silently
  const offRange = data.atoms.filter((a) => !atoms.includes(a));
  const x = makeAxis(
    [...drawn.map((r) => r.x), ...atoms.map((a) => a.x)],
    xk,
    [M.left, width - M.right],
  );
  const yVals = view === "density" ? [...ys, ...(yKind === "log" ? [] : [0])] : ys;
  const y = makeAxis(yVals, yKind, [HEIGHT - M.bottom, M.top], view === "density" ? { includeZero: yKind === "linear" } : yKind === "linear" ? { fixed: [0, 1] } : {});
  const pts = drawn.map((r, i): [number, number] | null => {
    const v = ys[i];
    if (!Number.isFinite(v) || (yKind === "log" && v <= LOG_FLOOR)) return null;
    return [x.map(r.x), y.map(v)];
  });
  const h = hover !== null && drawn[hover] ? drawn[hover] : null;
  const plotW = width - M.left - M.right;
  // The caution printed in the figure (it travels with an exported PNG or SVG) takes two lines on a phone.
  const narrow = width < 600;
  const total = HEIGHT + (narrow ? 31 : 18);
  const yTitle = view === "density" ? (data.pdf ? "density f(x) of the continuous part" : "probability P(X = x)") : view === "cdf" ? "F(x) = P(X ≤ x)" : "1 − F(x) = P(X > x)";

  function onMove(e: React.PointerEvent<SVGRectElement>) {
    const r = (e.currentTarget as SVGRectElement).getBoundingClientRect();
    const px = M.left + ((e.clientX - r.left) / r.width) * plotW;
    setHover(nearestRow(drawn, x.invert(px)));
  }

  function applyRange(e: React.FormEvent) {
    e.preventDefault();
    const a = Number(from);
    const b = Number(to);
    if (!(a > 0 && a < 1 && b > 0 && b < 1)) return setRangeError("Both levels must lie strictly between 0 and 1, e.g. 0.0001 and 0.9999.");
    if (!(a < b)) return setRangeError("The lower level must be below the upper one.");
    setRangeError(null);
    onRange({ from: a, to: b });
  }

  function svgText(): string {
    const s = svg.current!.cloneNode(true) as SVGSVGElement;
    s.setAttribute("xmlns", "http://www.w3.org/2000/svg");
    s.querySelector("[data-hover]")?.remove();
    return `<?xml version="1.0" encoding="UTF-8"?>\n${new XMLSerializer().serializeToString(s)}`;
  }
  function exportPng() {
    const img = new Image();
    const url = URL.createObjectURL(new Blob([svgText()], { type: "image/svg+xml" }));
    img.onload = () => {
      const c = document.createElement("canvas");
      c.width = width * 2;
      c.height = total * 2;
      const g = c.getContext("2d")!;
      g.fillStyle = "#ffffff";
      g.fillRect(0, 0, c.width, c.height);
      g.scale(2, 2);
      g.drawImage(img, 0, 0);
      URL.revokeObjectURL(url);
      c.toBlob((b) => b && download("sumfold-plot.png", b), "image/png");
    };
    img.src = url;
  }

  const radio = (name: string, value: string, current: string, set: (v: string) => void, label: string, disabled = false) => (
    <label key={value} className={`inline-flex items-center gap-1 ${disabled ? "opacity-50" : ""}`}>
      <input type="radio" name={`${id}-${name}`} value={value} checked={current === value} disabled={disabled} onChange={() => set(value)} />
      {label}
    </label>
  );

  return (
    <figure className="min-w-0 rounded-xl border border-paper-line bg-white p-4" aria-labelledby={`${id}-cap`}>
      <figcaption id={`${id}-cap`} className="font-display text-lg font-semibold">
        {view === "density" ? (data.pdf ? "Density" : "Probability mass") : view === "cdf" ? "Distribution function" : "Exceedance probability"}
        {atoms.length ? <span className="ml-2 text-sm font-normal text-ink-soft">· {atoms.length === 1 ? "1 atom, marked with its mass" : `${atoms.length} atoms, marked with their masses`}</span> : null}
      </figcaption>
      {offRange.length ? (
        <p data-testid="atoms-off-range" className="mt-1 text-sm text-ink-soft">
          Outside the plotted range: {offRange.slice(0, 5).map((a) => `P(X = ${formatNumber(a.x)}) = ${formatNumber(a.p)}`).join("; ")}
          {offRange.length > 5 ? ` and ${offRange.length - 5} more (in the CSV)` : ""}.
        </p>
      ) : null}
      <div className="mt-2 flex flex-wrap gap-x-5 gap-y-2 text-sm">
        <fieldset className="flex flex-wrap items-center gap-3">
          <legend className="sr-only">View</legend>
          {VIEWS.map((v) => radio("view", v.id, view, (x) => chooseView(x as PlotView), v.label))}
        </fieldset>
        <fieldset className="flex items-center gap-3">
          <legend className="sr-only">x axis</legend>
          <span aria-hidden="true" className="text-ink-faint">x axis</span>
          {radio("x", "linear", xk, (v) => setXKind(v as AxisKind), "linear")}
          {radio("x", "log", xk, (v) => setXKind(v as AxisKind), "log", !xCanLog)}
        </fieldset>
        <fieldset className="flex items-center gap-3">
          <legend className="sr-only">y axis</legend>
          <span aria-hidden="true" className="text-ink-faint">y axis</span>
          {radio("y", "linear", yKind, (v) => setYKind(v as AxisKind), "linear")}
          {radio("y", "log", yKind, (v) => setYKind(v as AxisKind), "log")}
        </fieldset>
      </div>
      <div ref={box} className="mt-3 w-full">
        {/* max-w-full: before the first resize measurement the drawing scales down instead of widening the page */}
        <svg
          ref={svg}
          className="block h-auto max-w-full"
          width={width}
          height={total}
          viewBox={`0 0 ${width} ${total}`}
          role="img"
          aria-label={`${yTitle} over x from ${formatNumber(x.domain[0])} to ${formatNumber(x.domain[1])}`}
          fontFamily="system-ui, sans-serif"
          fontSize={11}
          data-testid="law-plot"
        >
          <rect x={0} y={0} width={width} height={total} fill="#ffffff" />
          {y.ticks.map((t) => (
            <g key={`y${t}`}>
              <line x1={M.left} x2={width - M.right} y1={y.map(t)} y2={y.map(t)} stroke={COLORS.grid} />
              <text x={M.left - 6} y={y.map(t) + 4} textAnchor="end" fill={COLORS.faint}>
                {formatNumber(t)}
              </text>
            </g>
          ))}
          {x.ticks.map((t) => (
            <g key={`x${t}`}>
              <line x1={x.map(t)} x2={x.map(t)} y1={M.top} y2={HEIGHT - M.bottom} stroke={COLORS.grid} />
              <text x={x.map(t)} y={HEIGHT - M.bottom + 16} textAnchor="middle" fill={COLORS.faint}>
                {formatNumber(t)}
              </text>
            </g>
          ))}
          <line x1={M.left} x2={width - M.right} y1={HEIGHT - M.bottom} y2={HEIGHT - M.bottom} stroke={COLORS.ink} />
          <line x1={M.left} x2={M.left} y1={M.top} y2={HEIGHT - M.bottom} stroke={COLORS.ink} />
          <text x={M.left + plotW / 2} y={HEIGHT - M.bottom + 34} textAnchor="middle" fill={COLORS.ink}>
            x{xk === "log" ? " (log scale)" : ""}
          </text>
          <text x={M.left} y={HEIGHT - 6} fill={COLORS.ink} fontSize={10}>
            {yTitle}{yKind === "log" ? " (log scale)" : ""}
          </text>
          <path d={paths(pts)} fill="none" stroke={COLORS.curve} strokeWidth={2} />
          {atoms.map((a) => {
            const ax = x.map(a.x);
            const top = view === "density" ? M.top + 10 : y.map(Math.max(view === "cdf" ? 0 : LOG_FLOOR, view === "cdf" ? (drawn[nearestRow(drawn, a.x)]?.cdf ?? a.p) : (drawn[nearestRow(drawn, a.x)]?.sf ?? 1 - a.p)));
            return (
              <g key={`atom${a.x}`} data-testid="atom-marker">
                <line x1={ax} x2={ax} y1={HEIGHT - M.bottom} y2={top} stroke={COLORS.atom} strokeWidth={2} strokeDasharray={view === "density" ? "4 3" : undefined} />
                <path d={`M${ax},${top - 6}L${ax + 6},${top}L${ax},${top + 6}L${ax - 6},${top}Z`} fill={COLORS.atom} />
                <text x={Math.min(ax + 9, width - M.right - 4)} y={top + 4} fill="#8a5a12" fontWeight={600} textAnchor={ax + 120 > width ? "end" : "start"}>
                  atom P(X = {formatNumber(a.x)}) = {formatNumber(a.p)}
                </text>
              </g>
            );
          })}
          {h ? (
            <g data-hover="">
              <line x1={x.map(h.x)} x2={x.map(h.x)} y1={M.top} y2={HEIGHT - M.bottom} stroke={COLORS.ink} strokeDasharray="2 3" />
              {Number.isFinite(yOf(view, h) ?? NaN) && !(yKind === "log" && (yOf(view, h) ?? 0) <= LOG_FLOOR) ? <circle cx={x.map(h.x)} cy={y.map(yOf(view, h)!)} r={4} fill={COLORS.curve} /> : null}
            </g>
          ) : null}
          <rect data-testid="plot-area" x={M.left} y={M.top} width={plotW} height={HEIGHT - M.top - M.bottom} fill="transparent" pointerEvents="all" onPointerMove={onMove} onPointerLeave={() => setHover(null)} style={{ touchAction: "pan-y" }} />
          {(narrow ? ["Sumfold · a computational aid;", "decisions rest with licensed practice and local regulation"] : ["Sumfold · a computational aid; decisions rest with licensed practice and local regulation"]).map((line, i) => (
            <text key={line} x={width - M.right} y={HEIGHT + 12 + i * 13} textAnchor="end" fill={COLORS.faint} fontSize={10}>
              {line}
            </text>
          ))}
        </svg>
      </div>
      <p aria-live="polite" data-testid="plot-readout" className="mt-1 min-h-5 font-mono text-xs tabular-nums text-ink-soft">
        {h
          ? `x = ${formatNumber(h.x)} · ${dLabel} = ${withBound(h.density, h.err.density)} · F = ${withBound(h.cdf, h.err.cdf)} · 1 − F = ${withBound(h.sf, h.err.sf)}`
          : "Point at the plot to read x, the density, F and 1 − F, each with its error bound."}
      </p>
      <div className="mt-3 flex flex-wrap items-end justify-between gap-3">
        <form onSubmit={applyRange} className="flex flex-wrap items-end gap-2 text-sm" noValidate>
          <label className="flex flex-col">
            <span className="text-xs text-ink-faint">x from the quantile at p =</span>
            <input className="w-24 rounded-md border border-paper-line px-2 py-1" inputMode="decimal" value={from} onChange={(e) => setFrom(e.target.value)} aria-label="Range from level" />
          </label>
          <label className="flex flex-col">
            <span className="text-xs text-ink-faint">to p =</span>
            <input className="w-24 rounded-md border border-paper-line px-2 py-1" inputMode="decimal" value={to} onChange={(e) => setTo(e.target.value)} aria-label="Range to level" />
          </label>
          <button type="submit" className={quietButtonClass} disabled={busy}>
            {busy ? "Plotting…" : "Replot"}
          </button>
        </form>
        <div className="flex flex-wrap gap-2" role="group" aria-label="Export">
          <button type="button" className={quietButtonClass} onClick={() => download("sumfold-plot.csv", new Blob([plotCsv(data, rows)], { type: "text/csv" }))}>
            CSV
          </button>
          <button type="button" className={quietButtonClass} onClick={() => download("sumfold-plot.svg", new Blob([svgText()], { type: "image/svg+xml" }))}>
            SVG
          </button>
          <button type="button" className={quietButtonClass} onClick={exportPng}>
            PNG
          </button>
        </div>
      </div>
      {rangeError ? <p className="mt-1 text-sm text-red-700">{rangeError}</p> : null}
    </figure>
  );
}
