import type { CompiledModel } from "./types";
import type { Model } from "./schema";
import { compile } from "./compile";
import { CfError } from "./errors";
import { MAX_MOMENT_ORDER } from "./limits";
import { cumulantsToCentral, cumulantsToRaw } from "./node";
import { boundFor, cumulantsToCentralE, cumulantsToRawE, div, mul, sqrt, type EstList } from "./moment-error";

export interface MomentsResult {
  order: number;
  /** E X^k, k = 1..order (index 0 = order 1); null where the moment does not exist */
  raw: (number | null)[];
  /** E (X - mean)^k */
  central: (number | null)[];
  /** kappa_k */
  cumulants: (number | null)[];
  mean: number | null;
  variance: number | null;
  skewness: number | null;
  excessKurtosis: number | null;
  /** bounds on the absolute error of each value above (running error analysis through the model tree and the
   *  conversions, moment-error.ts); null where the value is null or where no bound is derived (a note says so) */
  rawError: (number | null)[];
  centralError: (number | null)[];
  cumulantError: (number | null)[];
  meanError: number | null;
  varianceError: number | null;
  skewnessError: number | null;
  excessKurtosisError: number | null;
  /** exists[k-1]: E|X|^k < infinity */
  exists: boolean[];
  /** sup{ r : E|X|^r < inf } */
  momentIndex: number;
  /** why an entry is null (one per order; null when the value is present) */
  reasons: (string | null)[];
  notes: string[];
}

function isCompiled(x: unknown): x is CompiledModel {
  return typeof x === "object" && x !== null && typeof (x as CompiledModel).logCf === "function";
}

/**
 * Exact moments through the model tree: family cumulants in closed form combined by the operators (cumulants add over
 * sums, scale by a^n, shift moves kappa_1, repeat multiplies, mixtures mix raw moments, compounds compose the cumulant
 * series); raw and central moments from cumulants by m_n = sum_k C(n-1, k-1) kappa_k m_{n-k} (Smith 1995, "A recursive
 * formulation of the old problem of obtaining moments from cumulants and vice versa", The American Statistician 49(2),
 * checked against mpmath in tests/cf/moments-bounds.test.ts). Orders at or above the moment index come back
 * null with the reason. Every value carries a derived bound on its absolute error.
 */
export function moments(model: Model | CompiledModel | unknown, order: number): MomentsResult {
  if (!Number.isInteger(order) || order < 1) throw new CfError("invalid_model", "/order", `The moment order must be a whole number >= 1, got ${order}.`);
  if (order > MAX_MOMENT_ORDER) throw new CfError("limit_exceeded", "/order", `The moment order may be at most ${MAX_MOMENT_ORDER}, got ${order}.`);
  const c = isCompiled(model) ? model : compile(model);
  const mi = c.momentIndex;
  const kappa = c.cumulants(order);
  const exists: boolean[] = [];
  const reasons: (string | null)[] = [];
  for (let k = 1; k <= order; k++) {
    const ex = k < mi;
    exists.push(ex);
    if (!ex) {
      kappa[k - 1] = null;
      reasons.push(
        mi <= 0
          ? `E|X|^${k} is infinite: no moment of any positive order exists.`
          : `E|X|^${k} is infinite: moments of this law exist only for orders below ${mi}.`,
      );
    } else reasons.push(kappa[k - 1] === null ? `The order-${k} moment exists but has no exact route here.` : null);
  }
  const raw = cumulantsToRaw(kappa);
  const central = cumulantsToCentral(kappa);
  const kErr = c.cumulantErrors ? c.cumulantErrors(order) : kappa.map(() => Infinity);
  const kEst: EstList = kappa.map((v, k) => (v === null ? null : { v, e: kErr[k] ?? Infinity }));
  const rawE = cumulantsToRawE(kEst);
  const centralE = cumulantsToCentralE(kEst);
  const fin = (e: number | null) => (e !== null && Number.isFinite(e) ? e : null);
  const rawError = raw.map((v, k) => fin(boundFor(v, rawE[k])));
  const centralError = central.map((v, k) => fin(boundFor(v, centralE[k])));
  const cumulantError = kappa.map((v, k) => fin(boundFor(v, kEst[k])));
  const k2 = kappa[1] ?? null;
  const mean = kappa[0] ?? null;
  const variance = order >= 2 ? k2 : null;
  const skewness = order >= 3 && kappa[2] !== null && k2 !== null && k2 > 0 ? (kappa[2] as number) / k2 ** 1.5 : null;
  const excessKurtosis = order >= 4 && kappa[3] !== null && k2 !== null && k2 > 0 ? (kappa[3] as number) / (k2 * k2) : null;
  const k2E = kEst[1] ?? null;
  const skewnessError = skewness === null || !k2E || !kEst[2] ? null : fin(boundFor(skewness, div(kEst[2], mul(k2E, sqrt(k2E)))));
  const excessKurtosisError = excessKurtosis === null || !k2E || !kEst[3] ? null : fin(boundFor(excessKurtosis, div(kEst[3], mul(k2E, k2E))));
  const meanError = mean === null ? null : cumulantError[0];
  const varianceError = variance === null ? null : cumulantError[1];
  const notes = [...c.notes];
  if (mi === Infinity) notes.push("all moments exist");
  else notes.push(`moments exist for orders below ${mi}`);
  if (k2 === 0 && order >= 3) notes.push("variance is zero: skewness and kurtosis are undefined");
  const unbounded = [...raw.map((v, k) => [v, rawError[k]]), ...central.map((v, k) => [v, centralError[k]]), [skewness, skewnessError], [excessKurtosis, excessKurtosisError]].some(
    ([v, e]) => v !== null && e === null,
  );
  if (unbounded) notes.push("no error bound is derived for some moments of this model (their error fields are null)");
  return {
    order, raw, central, cumulants: kappa, mean, variance, skewness, excessKurtosis,
    rawError, centralError, cumulantError, meanError, varianceError, skewnessError, excessKurtosisError,
    exists, momentIndex: mi, reasons, notes,
  };
}
