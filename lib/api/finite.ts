import { ApiError } from "./errors";

/**
 * Answers are numbers or errors. Before a computation: inputs whose own arithmetic would overflow a double are
 * refused with 422 and a pointer (a grid span to - from past the largest double, lattice tables whose convolution
 * power would exceed it). After it: probabilities a hair outside [0, 1] (or a density a hair below 0) are clamped
 * only where the result's own error bound covers the excursion; anything else not finite or out of range is a
 * 422 `tolerance_unreached` that names the value and the bound that could not be met. No 200 carries NaN or
 * Infinity (JSON would turn them into null).
 */
const LOG_MAX = Math.log(Number.MAX_VALUE);

const refuse = (detail: string, pointer: string) => new ApiError("validation", detail, { errors: [{ detail, pointer }] });

function checkSpan(spec: unknown, pointer: string): void {
  if (!spec || typeof spec !== "object" || Array.isArray(spec)) return;
  const { from, to, count } = spec as { from?: number; to?: number; count?: number };
  if (typeof from !== "number" || typeof to !== "number") return;
  const span = to - from;
  if (!Number.isFinite(span)) throw refuse(`The span ${pointer.slice(1)}.to - ${pointer.slice(1)}.from overflows a double (from ${from} to ${to}); keep |to - from| below ${Number.MAX_VALUE.toExponential(3)}.`, pointer);
  if (typeof count === "number" && count > 1 && !Number.isFinite(span / (count - 1))) throw refuse(`The grid step overflows a double.`, pointer);
}

/** Throws 422 with a pointer when a body's own arithmetic would overflow before the engine starts. */
export function refuseOverflow(op: string, body: Record<string, unknown>): void {
  if (op === "density") {
    checkSpan(body.grid, "/grid");
    checkSpan(body.range, "/range");
  }
  if (op === "cf") checkSpan(body.t, "/t");
  if (op === "convolve") {
    const terms = (body.terms ?? []) as { p: number[] }[];
    const power = typeof body.power === "number" ? body.power : 1;
    let logTotal = 0;
    for (let i = 0; i < terms.length; i++) {
      let s = 0;
      for (const v of terms[i].p) s += v;
      if (!Number.isFinite(s)) throw refuse(`The probabilities of term ${i} sum past the largest double; probabilities sum to at most 1.`, `/terms/${i}/p`);
      logTotal += Math.log(Math.max(s, Number.MIN_VALUE));
      if (power * logTotal > LOG_MAX) {
        throw refuse(`The total mass of the result (the product of the terms' sums${power > 1 ? `, to the power ${power}` : ""}) overflows a double; probabilities sum to at most 1.`, `/terms/${i}/p`);
      }
    }
  }
}

type Json = Record<string, unknown>;

const isNumList = (v: unknown): v is number[] | Float64Array => v instanceof Float64Array || (Array.isArray(v) && (v.length === 0 || typeof v[0] === "number"));

function unreached(detail: string, pointer: string | null): ApiError {
  return new ApiError("tolerance_unreached", detail, pointer ? { errors: [{ detail, pointer }] } : {});
}

/** The request field a density value at index i comes from: the i-th point, or the grid. */
const sourceOf = (body: Json, i: number) => (Array.isArray(body.x) ? `/x/${i}` : body.grid ? "/grid" : "");

function clampDensity(body: Json, r: Json): void {
  const diag = (r.diagnostics ?? {}) as { error?: { cdf?: number; pdf?: number } };
  const errCdf = Number(diag.error?.cdf);
  const errPdf = Number(diag.error?.pdf);
  const tol = typeof body.tolerance === "number" ? `the tolerance ${body.tolerance}` : "the default tolerance";
  const x = r.x as number[];
  for (const field of ["cdf", "sf", "pmf"] as const) {
    const a = r[field] as number[] | undefined;
    if (!a) continue;
    for (let i = 0; i < a.length; i++) {
      const v = a[i];
      if (!Number.isFinite(v)) throw unreached(`The ${field} at x = ${x[i]} could not be computed (${v}); ${tol} could not be reached there.`, sourceOf(body, i));
      const over = v > 1 ? v - 1 : v < 0 ? -v : 0;
      if (over === 0) continue;
      if (Number.isFinite(errCdf) && over <= errCdf) a[i] = v > 1 ? 1 : 0;
      else
        throw unreached(
          `The ${field} at x = ${x[i]} came out as ${v}, outside [0, 1] by ${over.toExponential(2)}, more than its error bound (${Number.isFinite(errCdf) ? errCdf.toExponential(2) : "unbounded"}): ${tol} could not be reached there.`,
          sourceOf(body, i),
        );
    }
  }
  const pdf = r.pdf as (number | null)[] | undefined;
  const unboundedAt = new Set((diag as { unboundedDensityAt?: number[] }).unboundedDensityAt ?? []);
  if (pdf) {
    for (let i = 0; i < pdf.length; i++) {
      const v = pdf[i];
      // the documented null: the law's density is +infinity at that very point (listed in diagnostics.unboundedDensityAt)
      if ((v === null || v === Infinity) && unboundedAt.has(x[i])) continue;
      if (v === null || !Number.isFinite(v)) throw unreached(`The pdf at x = ${x[i]} could not be computed (${v}); ${tol} could not be reached there.`, sourceOf(body, i));
      if (v >= 0) continue;
      if (Number.isFinite(errPdf) && -v <= errPdf) pdf[i] = 0;
      else throw unreached(`The pdf at x = ${x[i]} came out as ${v}, below 0 by more than its error bound (${Number.isFinite(errPdf) ? errPdf.toExponential(2) : "unbounded"}): ${tol} could not be reached there.`, sourceOf(body, i));
    }
  }
}

/** Finds the first number that is not finite in a result, without recursion; returns its path or null. */
export function firstNonFinite(root: unknown): string | null {
  const stack: { v: unknown; at: string }[] = [{ v: root, at: "" }];
  while (stack.length) {
    const { v, at } = stack.pop()!;
    if (typeof v === "number") {
      if (!Number.isFinite(v)) return at;
    } else if (isNumList(v)) {
      // null stands for "does not exist" (a moment) and is not a float
      for (let i = 0; i < v.length; i++) if (v[i] !== null && !Number.isFinite(v[i])) return `${at}/${i}`;
    } else if (Array.isArray(v)) {
      for (let i = v.length - 1; i >= 0; i--) stack.push({ v: v[i], at: `${at}/${i}` });
    } else if (v && typeof v === "object") {
      for (const [k, x] of Object.entries(v)) stack.push({ v: x, at: `${at}/${k}` });
    }
  }
  return null;
}

/**
 * Diagnostics may hold quantities that are infinite by nature (e.g. the largest frequency used for a law with no
 * density); they are sent as null (as JSON always rendered them), never as a float.
 */
function nullNonFinite(root: Json): void {
  const stack: unknown[] = [root];
  while (stack.length) {
    const v = stack.pop();
    if (!v || typeof v !== "object") continue;
    for (const [k, x] of Object.entries(v)) {
      if (typeof x === "number" && !Number.isFinite(x)) (v as Record<string, unknown>)[k] = null;
      else if (x instanceof Float64Array && x.some((y) => !Number.isFinite(y))) (v as Record<string, unknown>)[k] = Array.from(x, (y) => (Number.isFinite(y) ? y : null));
      else if (x && typeof x === "object" && !(x instanceof Float64Array)) stack.push(x);
    }
  }
}

/** Makes a result safe to answer 200 with, or throws 422: clamps where the bound allows, refuses otherwise. */
export function finiteResult(op: string, body: Json, result: Json): Json {
  if (op === "density") clampDensity(body, result);
  if (op === "quantiles") {
    const qe = (result.diagnostics as { quantileError?: ArrayLike<number> } | undefined)?.quantileError;
    const p = body.p as number[];
    for (let i = 0; qe && i < qe.length; i++) {
      if (!Number.isFinite(qe[i]) && p[i] > 0 && p[i] < 1) {
        const tol = typeof body.tolerance === "number" ? `the tolerance ${body.tolerance}` : "the default tolerance";
        throw unreached(`The quantile at p = ${p[i]} could not be resolved (its error bound is unbounded): ${tol} could not be reached there.`, `/p/${i}`);
      }
    }
  }
  if (result.diagnostics && typeof result.diagnostics === "object") nullNonFinite(result.diagnostics as Json);
  if (op === "quantiles") {
    const x = result.x as number[];
    const p = body.p as number[];
    for (let i = 0; i < x.length; i++) {
      if (Number.isFinite(x[i])) continue;
      if (p[i] === 0 || p[i] === 1) {
        const detail = `The quantile at p = ${p[i]} is ${p[i] === 0 ? "minus " : ""}infinity: the law is unbounded ${p[i] === 0 ? "below" : "above"}. Ask for levels inside (0, 1).`;
        throw new ApiError("not_applicable", detail, { errors: [{ detail, pointer: `/p/${i}` }] });
      }
      throw unreached(`The quantile at p = ${p[i]} could not be resolved to a finite number; the requested tolerance could not be reached there.`, `/p/${i}`);
    }
  }
  const bad = firstNonFinite(result);
  if (bad !== null) {
    throw unreached(
      `The result's ${bad.slice(1).replace(/\//g, ".")} is not a finite number: the engine could not reach the requested accuracy for this request. Loosen the tolerance or narrow the range or points.`,
      null,
    );
  }
  return result;
}
