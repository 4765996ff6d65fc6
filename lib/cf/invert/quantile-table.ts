import type { Atom, CompiledModel } from "../types";
import { latticeCumulative, solveLattice } from "./lattice";
import type { QuantileDiagnostics, QuantileOptions, QuantileResult } from "./quantile";

/** Quantiles and expected shortfall of laws given as tables: finite atoms and lattice laws. */

export function atomQuantiles(atomsIn: Atom[], p: Float64Array, o: QuantileOptions): QuantileResult {
  const atoms = [...atomsIn].sort((u, v) => u.x - v.x);
  const xs = atoms.map((a) => a.x);
  const probs = atoms.map((a) => a.p);
  return tableQuantiles(Float64Array.from(xs), Float64Array.from(probs), p, o, "atoms", 4 * Number.EPSILON * atoms.length, []);
}

export function latticeQuantiles(model: CompiledModel, origin: number, step: number, p: Float64Array, o: QuantileOptions): QuantileResult {
  const sol = solveLattice(model, origin, step, o.tolerance ?? 1e-13);
  const t = sol.table;
  const xs = new Float64Array(t.p.length);
  for (let i = 0; i < xs.length; i++) xs[i] = t.origin + i * t.step;
  return tableQuantiles(xs, t.p, p, o, sol.method, sol.errorCdf, sol.notes);
}

/** Quantiles and ES of a law given as sorted support points and probabilities (sf summed from the right). */
export function tableQuantiles(
  xs: Float64Array,
  probs: Float64Array,
  p: Float64Array,
  o: QuantileOptions,
  method: QuantileDiagnostics["method"],
  errCdf: number,
  notes: string[],
): QuantileResult {
  const { cdf, sf } = latticeCumulative(probs);
  const n = xs.length;
  const out = new Float64Array(p.length);
  const err = new Float64Array(p.length);
  const es = o.expectedShortfall ? new Float64Array(p.length) : undefined;
  const esErr = o.expectedShortfall ? new Float64Array(p.length) : undefined;
  for (let i = 0; i < p.length; i++) {
    const pi = p[i];
    const upper = pi > 0.5;
    let k = 0;
    // smallest k with F_k >= p, judged on the sf side above the median
    if (upper) {
      const s = 1 - pi;
      while (k < n - 1 && sf[k] > s + errCdf) k++;
    } else {
      while (k < n - 1 && cdf[k] < pi - errCdf) k++;
    }
    out[i] = xs[k];
    err[i] = 0;
    if (es && esErr) {
      if (pi >= 1) {
        es[i] = out[i];
        continue;
      }
      let ex = 0;
      for (let j = n - 1; j > k; j--) ex += Math.max(probs[j], 0) * (xs[j] - xs[k]);
      es[i] = xs[k] + ex / (1 - pi);
      esErr[i] = ((errCdf * Math.abs(xs[n - 1] - xs[k]) + 4 * Number.EPSILON * Math.abs(ex)) / (1 - pi)) * 2;
    }
  }
  return {
    p,
    x: out,
    expectedShortfall: es,
    diagnostics: {
      method,
      terms: n,
      range: { from: xs[0], to: xs[n - 1] },
      cdfError: errCdf,
      quantileError: err,
      expectedShortfallError: esErr,
      notes,
    },
  };
}
