// Shared assertions of the lib/cf tests: every failure prints inputs, value, expected, difference, tolerance.
import { expect } from "vitest";
import { CfError } from "@/lib/cf/errors";
import { validateModel } from "@/lib/cf/validate";

export type Tol = { abs?: number; rel?: number };

export function close(actual: number, expected: number, tol: Tol, what: string): void {
  const diff = Math.abs(actual - expected);
  const bound = Math.max(tol.abs ?? 0, (tol.rel ?? 0) * Math.abs(expected));
  const ok = (Number.isNaN(actual) && Number.isNaN(expected)) || actual === expected || diff <= bound;
  if (!ok) {
    expect.fail(`${what}: value ${actual}, expected ${expected}, difference ${diff}, tolerance ${JSON.stringify(tol)} (bound ${bound})`);
  }
}

/** Complex closeness |a - b| <= rel * |b| (or abs). Returns the relative error seen. */
export function closeC(ar: number, ai: number, br: number, bi: number, tol: Tol, what: string): number {
  const diff = Math.hypot(ar - br, ai - bi);
  const mag = Math.hypot(br, bi);
  const bound = Math.max(tol.abs ?? 0, (tol.rel ?? 0) * mag);
  if (!(diff <= bound)) {
    expect.fail(`${what}: value ${ar}${ai >= 0 ? "+" : ""}${ai}i, expected ${br}${bi >= 0 ? "+" : ""}${bi}i, difference ${diff}, tolerance ${JSON.stringify(tol)} (bound ${bound})`);
  }
  return mag > 0 ? diff / mag : diff;
}

/** Worst errors observed, printed at the end of a file for the report. */
export const worst: Record<string, number> = {};
export function record(key: string, err: number): void {
  worst[key] = Math.max(worst[key] ?? 0, err);
}

/** The CfError validateModel throws for a model (fails the test when the model is accepted). */
export function errorOf(model: unknown): CfError {
  try {
    validateModel(model);
  } catch (e) {
    if (e instanceof CfError) return e;
    throw e;
  }
  throw new Error(`expected ${JSON.stringify(model).slice(0, 200)} to be rejected`);
}
