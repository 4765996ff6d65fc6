// The bound audit's shared state and its per-call checks (scripts/bound-audit.ts prints the table; the fixture sets
// are in ./bound-audit-sets.ts).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { compile } from "@/lib/cf/compile";
import { clearDeadline, setDeadline } from "@/lib/cf/deadline";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import { moments } from "@/lib/cf/moments";
import type { CompiledModel, Model } from "@/lib/cf/types";

export const ROOT = join(import.meta.dirname, "../../tests/fixtures");
export const DEADLINE_MS = Number(process.env.BOUND_AUDIT_DEADLINE_MS ?? 300_000);
/** only the sets whose name contains this (e.g. BOUND_AUDIT_ONLY=stable) */
export const ONLY = process.env.BOUND_AUDIT_ONLY ?? "";
export const PER_POINT = process.env.BOUND_AUDIT_PER_POINT === "1";
/** points whose reference cdf or sf is below this are far-tail points, counted apart in the looseness columns */
export const TAIL = 1e-6;
/** a reference read into a double is itself only known to about one rounding */
export const DOUBLE = 2 ** -52;

export type Quantity = "pdf" | "pmf" | "cdf" | "sf" | "quantile" | "ES" | "moment" | "stopLoss" | "limitedMean" | "layerMean";
export const QUANTITIES: Quantity[] = ["pdf", "pmf", "cdf", "sf", "quantile", "ES", "moment", "stopLoss", "limitedMean", "layerMean"];

export interface Sample {
  set: string;
  quantity: Quantity;
  label: string;
  got: number;
  want: number;
  /** the reference's own uncertainty (absolute) */
  refErr: number;
  /** the engine's stated bound (absolute); NaN when the answer carries none */
  bound: number;
  /** a point in a far tail (reference cdf or sf below TAIL): an absolute bound cannot follow its value there */
  tail: boolean;
}
export const samples: Sample[] = [];
export const failures: string[] = [];

export const num = (v: string | number) => (typeof v === "string" ? Number(v) : v);
export const read = <T>(path: string): T => JSON.parse(readFileSync(join(ROOT, path), "utf8")) as T;

export const slow: string[] = [];
export function guarded<T>(what: string, fn: () => T): T | undefined {
  setDeadline(Date.now() + DEADLINE_MS);
  const c0 = process.cpuUsage();
  try {
    return fn();
  } catch (e) {
    failures.push(`${what}: ${(e as Error).message}`);
    return undefined;
  } finally {
    clearDeadline();
    const c = process.cpuUsage(c0);
    const ms = (c.user + c.system) / 1000;
    if (ms > 2000) {
      slow.push(`${what}: ${(ms / 1000).toFixed(1)} s CPU`);
      console.error(`slow: ${what}: ${(ms / 1000).toFixed(1)} s CPU`);
    }
  }
}

export function push(set: string, quantity: Quantity, label: string, got: number, want: number, refErr: number, bound: number, tail = false) {
  samples.push({ set, quantity, label, got, want, refErr: Math.max(refErr, DOUBLE * Math.abs(want)), bound, tail });
}

export interface PointRef {
  x: number;
  pdf?: number;
  pmf?: number;
  cdf?: number;
  sf?: number;
}
export interface LevelRef {
  p: number;
  q?: number;
  qErr?: number;
  es?: number | null;
  esErr?: number;
}

/**
 * pdf (or pmf), cdf and sf at the points, each with its stated bound: by default one call for all of a model's points
 * (as a client would ask: the bound is the point's own where the answer has point bounds, else the call's bound over
 * every point), with BOUND_AUDIT_PER_POINT=1 one call per point (each value's own best bound).
 */
export function points(set: string, model: Model, c: CompiledModel, refs: PointRef[], refErr: (v: number, i: number) => number) {
  const groups = PER_POINT ? refs.map((r, i) => [[r, i] as const]) : [refs.map((r, i) => [r, i] as const)];
  for (const g of groups) {
    const xs = g.map(([r]) => r.x);
    const r = guarded(`${set} ${JSON.stringify(model)} x=${xs.length === 1 ? xs[0] : `${xs.length} points`}`, () => density(c, { x: xs }));
    if (!r) continue;
    const e = r.diagnostics.error;
    // each value's bound as the API answers it: its point bound where the route gives one, else the whole answer's
    const pe = r.diagnostics.pointError;
    g.forEach(([ref, i], j) => {
      const label = `${JSON.stringify(model)} x=${ref.x}`;
      const tail = Math.min(ref.cdf ?? 1, ref.sf ?? 1) < TAIL;
      const add = (quantity: Quantity, got: number, want: number, refErr: number, bound: number) => push(set, quantity, label, got, want, refErr, bound, tail);
      if (ref.pdf !== undefined && r.pdf) add("pdf", r.pdf[j], ref.pdf, refErr(ref.pdf, i), pe ? pe.pdf[j] : e.pdf);
      if (ref.pmf !== undefined && r.pmf) add("pmf", r.pmf[j], ref.pmf, refErr(ref.pmf, i), pe ? pe.pdf[j] : e.pdf);
      if (ref.pdf !== undefined && !r.pdf && r.pmf) failures.push(`${set} ${label}: a pdf reference but the engine answered a pmf`);
      if (ref.cdf !== undefined) add("cdf", r.cdf[j], ref.cdf, refErr(ref.cdf, i), pe ? pe.cdf[j] : e.cdf);
      if (ref.sf !== undefined) add("sf", r.sf[j], ref.sf, refErr(ref.sf, i), pe ? pe.sf[j] : e.cdf);
    });
  }
}

/** quantiles (and ES) at the levels, each with its own stated bound (per level in the answer): one call per model */
export function levels(set: string, model: Model, c: CompiledModel, refs: LevelRef[]) {
  if (!refs.length) return;
  const wantEs = refs.some((l) => l.es !== undefined && l.es !== null);
  const r = guarded(`${set} ${JSON.stringify(model)} ${refs.length} levels`, () => quantiles(c, refs.map((l) => l.p), { expectedShortfall: wantEs }));
  if (!r) return;
  refs.forEach((ref, i) => {
    const label = `${JSON.stringify(model)} p=${ref.p}`;
    if (ref.q !== undefined) push(set, "quantile", label, r.x[i], ref.q, ref.qErr ?? 0, r.diagnostics.quantileError[i]);
    if (ref.es !== undefined && ref.es !== null) push(set, "ES", label, r.expectedShortfall![i], ref.es, ref.esErr ?? 0, r.diagnostics.expectedShortfallError![i]);
  });
}

export function rawMoments(set: string, model: Model, c: CompiledModel, raw: number[], relErr: number) {
  if (!raw.length) return;
  const m = guarded(`${set} ${JSON.stringify(model)} moments`, () => moments(c, raw.length));
  if (!m) return;
  raw.forEach((want, k) => {
    const got = m.raw[k];
    if (got === null || !Number.isFinite(want)) return;
    // quadrature references of a moment that is 0 (a symmetric law) carry an absolute noise of ~1e-20
    push(set, "moment", `${JSON.stringify(model)} E X^${k + 1}`, got, want, relErr * Math.abs(want) + 1e-20, m.rawError[k] ?? Infinity);
  });
}

export const compiled = (set: string, model: Model) => guarded(`${set} compile ${JSON.stringify(model)}`, () => compile(model));

