import { scaleLinear, scaleLog } from "d3-scale";

/** What the explorer plots: the law on a grid, with its atoms kept apart from the continuous part. */
export interface LawTable {
  x: number[];
  pdf?: number[];
  pmf?: number[];
  cdf: number[];
  sf?: number[];
  atoms: { x: number; p: number }[];
  /** the API's bounds at each x (density diagnostics.pointError), shown beside the values they bound */
  diagnostics?: { pointError?: { pdf?: (number | null)[]; cdf?: (number | null)[]; sf?: (number | null)[] } };
}

export type PlotView = "density" | "cdf" | "exceedance";
export type AxisKind = "linear" | "log";

export interface PlotRow {
  x: number;
  density: number | null;
  cdf: number;
  sf: number;
  /** bounds on the absolute error of density, cdf and sf at x (null: none derived) */
  err: { density: number | null; cdf: number | null; sf: number | null };
}

/** Rows of the plotted table, cropped to [from, to]; sf falls back to 1 - cdf when the response has none. */
export function plotRows(t: LawTable, from = -Infinity, to = Infinity): PlotRow[] {
  const d = t.pdf ?? t.pmf;
  const pe = t.diagnostics?.pointError;
  const at = (a: (number | null)[] | undefined, i: number) => (a && typeof a[i] === "number" && Number.isFinite(a[i]) ? a[i] : null);
  const rows: PlotRow[] = [];
  for (let i = 0; i < t.x.length; i++) {
    const x = t.x[i];
    if (x < from || x > to) continue;
    // sf falls back to 1 - cdf, whose error is the cdf's
    const sfErr = t.sf ? at(pe?.sf, i) : at(pe?.cdf, i);
    rows.push({ x, density: d ? d[i] : null, cdf: t.cdf[i], sf: t.sf ? t.sf[i] : 1 - t.cdf[i], err: { density: d ? at(pe?.pdf, i) : null, cdf: at(pe?.cdf, i), sf: sfErr } });
  }
  return rows;
}

/** The value a view plots for a row. */
export const yOf = (view: PlotView, r: PlotRow) => (view === "density" ? r.density : view === "cdf" ? r.cdf : r.sf);

/** Smallest positive value worth drawing on a log axis: below it the plot would be rounding noise. */
export const LOG_FLOOR = 1e-16;

export interface Axis {
  domain: [number, number];
  ticks: number[];
  format: (v: number) => string;
  map: (v: number) => number;
  invert: (px: number) => number;
}

const fmt = (v: number) => {
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e5 || a < 1e-3) return v.toExponential(a >= 1e5 && Number.isInteger(v / 10 ** Math.floor(Math.log10(a))) ? 0 : 1).replace("e+", "e");
  return Number(v.toPrecision(4)).toLocaleString("en-GB", { maximumFractionDigits: 6 });
};
export const formatNumber = fmt;

/**
 * A nice axis for the values (d3-scale's nice domains and ticks): linear, or log over the positive values
 * (values at or below LOG_FLOOR are left off). `range` is the pixel span, start to end.
 */
export function makeAxis(values: number[], kind: AxisKind, range: [number, number], opts: { includeZero?: boolean; fixed?: [number, number] } = {}): Axis {
  const finite = values.filter((v) => Number.isFinite(v));
  if (kind === "log") {
    const pos = finite.filter((v) => v > LOG_FLOOR);
    let lo = opts.fixed?.[0] ?? (pos.length ? Math.min(...pos) : 1e-6);
    let hi = opts.fixed?.[1] ?? (pos.length ? Math.max(...pos) : 1);
    if (!(hi > lo)) hi = lo * 10;
    lo = 10 ** Math.floor(Math.log10(lo));
    hi = 10 ** Math.ceil(Math.log10(hi));
    const s = scaleLog().domain([lo, hi]).range(range);
    const decades = Math.log10(hi / lo);
    // at most about eight labelled ticks: every decade, or every second/third one on wide spans
    const every = Math.max(1, Math.ceil(decades / 8));
    const ticks: number[] = [];
    for (let e = Math.log10(lo); e <= Math.log10(hi) + 1e-9; e += every) ticks.push(10 ** e);
    return { domain: [lo, hi], ticks, format: fmt, map: (v) => s(Math.max(v, lo)), invert: (px) => s.invert(px) };
  }
  let lo = opts.fixed?.[0] ?? (finite.length ? Math.min(...finite) : 0);
  let hi = opts.fixed?.[1] ?? (finite.length ? Math.max(...finite) : 1);
  if (opts.includeZero) lo = Math.min(lo, 0);
  if (!(hi > lo)) {
    const pad = Math.abs(lo) * 0.01 || 1;
    lo -= pad;
    hi += pad;
  }
  const s = scaleLinear().domain([lo, hi]).range(range);
  // about one labelled tick per 70 px, so a phone-wide plot does not crowd its labels
  const count = Math.max(3, Math.min(8, Math.floor(Math.abs(range[1] - range[0]) / 70)));
  if (!opts.fixed) s.nice(count);
  const [a, b] = s.domain() as [number, number];
  return { domain: [a, b], ticks: s.ticks(count), format: fmt, map: (v) => s(v), invert: (px) => s.invert(px) };
}

/** The index of the row nearest to x (rows sorted by x). */
export function nearestRow(rows: PlotRow[], x: number): number {
  let lo = 0;
  let hi = rows.length - 1;
  if (hi < 0) return -1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (rows[mid].x < x) lo = mid;
    else hi = mid;
  }
  return Math.abs(rows[lo].x - x) <= Math.abs(rows[hi].x - x) ? lo : hi;
}

/** The plotted table as CSV (RFC 4180, full precision), atoms listed after the grid. */
export function plotCsv(t: LawTable, rows: PlotRow[]): string {
  const dname = t.pdf ? "pdf" : "pmf";
  const lines = [`x,${dname},cdf,sf,${dname}_error,cdf_error,sf_error`];
  for (const r of rows) lines.push(`${r.x},${r.density ?? ""},${r.cdf},${r.sf},${r.err.density ?? ""},${r.err.cdf ?? ""},${r.err.sf ?? ""}`);
  if (t.atoms.length) {
    lines.push("", "atom_x,atom_probability");
    for (const a of t.atoms) lines.push(`${a.x},${a.p}`);
  }
  return `${lines.join("\r\n")}\r\n`;
}

/** A value with its error bound for a read-out: "0.003282 ± 1.2e-12", or the value and "(no bound)" where none was derived. */
export const withBound = (v: number | null, e: number | null) => (v === null ? "—" : `${fmt(v)} ${e === null ? "(no bound)" : `± ${e.toPrecision(2).replace("e+", "e")}`}`);

/**
 * The plotted range widened to take in the law's atoms that lie near it (within one span of either end), so an atom
 * such as a compound's P(N = 0) at 0 is drawn with the density beside it; atoms farther out are listed, not drawn.
 */
export function rangeWithAtoms(lo: number, hi: number, atoms: { x: number }[]): { lo: number; hi: number; widened: boolean } {
  const span = hi - lo;
  let a = lo;
  let b = hi;
  for (const { x } of atoms) {
    if (x < a && x >= lo - span) a = x;
    if (x > b && x <= hi + span) b = x;
  }
  return { lo: a, hi: b, widened: a < lo || b > hi };
}
