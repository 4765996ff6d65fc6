"use client";

import { rangeWithAtoms, type LawTable } from "@/lib/portal/plot";
import { orgHeaders } from "../../_components/fetch";

export interface FieldIssue {
  detail: string;
  pointer: string;
}
export interface Problem {
  title?: string;
  detail?: string;
  error?: string;
  errors?: FieldIssue[];
}
export interface QuantileResult {
  p: number[];
  x: number[];
  expectedShortfall?: (number | null)[];
  diagnostics: Record<string, unknown> & { method?: string };
}
export interface MomentResult {
  mean: number | null;
  variance: number | null;
  skewness: number | null;
  excessKurtosis: number | null;
  meanError?: number | null;
  varianceError?: number | null;
  skewnessError?: number | null;
  excessKurtosisError?: number | null;
  notes: string[];
}
export type DensityResult = LawTable & { diagnostics: Record<string, unknown> };

export interface Results {
  density: DensityResult;
  quantiles: QuantileResult;
  moments: MomentResult;
  range: { from: number; to: number };
}

export class RunError extends Error {
  constructor(
    message: string,
    readonly problem: Problem,
  ) {
    super(message);
  }
}

/** One computation through the portal's explore handler (same schemas and code as the public API). */
export async function explore<T>(op: "density" | "quantiles" | "moments", body: unknown): Promise<T> {
  let res: Response;
  try {
    res = await fetch(`/api/portal/explore/${op}`, { method: "POST", headers: { "content-type": "application/json", ...orgHeaders() }, body: JSON.stringify(body) });
  } catch {
    throw new RunError("The server could not be reached. Check your connection and try again.", {});
  }
  const data = await res.json().catch(() => ({}));
  if (!res.ok) throw new RunError(data.detail ?? data.error ?? `The ${op} run failed (${res.status}).`, data as Problem);
  return data as T;
}

const GRID_POINTS = 501;

/**
 * The density on the range between two quantiles: the x-axis follows where the mass is, not the inversion's
 * periodisation window. Lattice laws come back as their own table, cropped to the same range.
 */
export async function densityOnRange(model: unknown, range: { from: number; to: number }): Promise<DensityResult> {
  const q = await explore<QuantileResult>("quantiles", { model, p: [range.from, range.to] });
  const [lo, hi] = q.x;
  if (!(hi > lo)) return explore<DensityResult>("density", { model });
  const d = await explore<DensityResult>("density", { model, grid: { from: lo, to: hi, count: GRID_POINTS } });
  if (d.pdf) {
    // an atom just outside the quantile range (a compound's P(N = 0) at 0) is drawn with the density beside it
    const w = rangeWithAtoms(lo, hi, d.atoms);
    return w.widened ? explore<DensityResult>("density", { model, grid: { from: w.lo, to: w.hi, count: GRID_POINTS } }) : d;
  }
  // Probabilities live on the law's own points (a lattice or a discretised law): take its table and crop it.
  const t = await explore<DensityResult>("density", { model });
  const keep = t.x.map((x) => x >= lo && x <= hi);
  const pick = <A,>(a: A[] | undefined) => a?.filter((_, i) => keep[i]);
  // the per-point bounds are cropped with the values they bound
  const pe = (t.diagnostics as { pointError?: Record<string, (number | null)[]> }).pointError;
  const pointError = pe ? Object.fromEntries(Object.entries(pe).map(([k, v]) => [k, pick(v)])) : undefined;
  return { ...t, x: pick(t.x)!, pdf: pick(t.pdf), pmf: pick(t.pmf), cdf: pick(t.cdf)!, sf: pick(t.sf), diagnostics: { ...t.diagnostics, ...(pointError ? { pointError } : {}) } };
}

export async function runAll(model: unknown, p: number[], range: { from: number; to: number }): Promise<Results> {
  // One after another: a plan caps the computations a person runs at once (two on Starter).
  const quantiles = await explore<QuantileResult>("quantiles", { model, p, expectedShortfall: true });
  const moments = await explore<MomentResult>("moments", { model, order: 4 });
  const density = await densityOnRange(model, range);
  return { density, quantiles, moments, range };
}

/** Parses the levels field: numbers strictly between 0 and 1, separated by commas or spaces. */
export function parseLevels(s: string): number[] | string {
  const parts = s.split(/[\s,;]+/).filter(Boolean);
  if (parts.length === 0) return "Give at least one level, e.g. 0.99.";
  const out = parts.map(Number);
  const bad = parts.find((p, i) => !(out[i] > 0 && out[i] < 1));
  return bad !== undefined ? `“${bad}” is not a level strictly between 0 and 1.` : out;
}
