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
  // exact tables carry only rounding in errCdf: it is the slack that keeps an exact level on its own atom (the
  // quantile's error then spans the points the slack cannot tell apart, below). A table
  // that approximates a continuous law (discretised) is searched at p itself, and the quantile's error is the
  // stretch of x where the true cdf can cross p: from the table's quantile at p - e (one cell lower, since the
  // continuous law's mass of that cell may lie anywhere in it) to its quantile at p + e.
  const approx = method === "discretised";
  // the levels p -+ e compared with the table's sums are themselves rounded (within u, every value in [0, 1]): 2 eps
  // more keeps each comparison's conclusion about the exact cdf (F < p or F >= p) true
  const e = errCdf + 2 * Number.EPSILON;
  const slack = approx ? 0 : e;
  const first = (level: number, sl: number) => {
    let k = 0;
    if (level > 0.5) {
      const s = 1 - level;
      while (k < n - 1 && sf[k] > s + sl) k++;
    } else {
      while (k < n - 1 && cdf[k] < level - sl) k++;
    }
    return k;
  };
  // the whole law is on the listed points (atoms) or the table's bound covers the mass beyond it (lattices: tailMass is
  // in errCdf): a level within errCdf of 1 may then lie past the last point only for a lattice
  const closed = method === "atoms";
  for (let i = 0; i < p.length; i++) {
    const pi = p[i];
    const k = first(pi, slack);
    out[i] = xs[k];
    if (approx) {
      const kLo = Math.max(0, first(pi - errCdf, 0) - 1);
      const hiLevel = pi + errCdf;
      const kHi = hiLevel >= 1 ? n - 1 : first(hiLevel, 0);
      const reached = hiLevel < 1 && (hiLevel > 0.5 ? sf[kHi] <= 1 - hiLevel : cdf[kHi] >= hiLevel);
      err[i] = reached ? Math.max(xs[k] - xs[kLo], xs[kHi] - xs[k]) : Infinity;
    } else {
      // a law on these points: with |F_table - F| <= errCdf at every point, F(x_j) >= p wherever F_table(x_j) >= p + e,
      // and F(x_j) < p wherever F_table(x_j) < p - e, so q_p is one of the points from k (the first with F_table >= p - e)
      // to the first with F_table >= p + e; 0 only when the cdf bound separates the level from every jump
      const hiLevel = pi + e;
      const kHi = hiLevel >= 1 ? n - 1 : first(hiLevel, 0);
      const reached = hiLevel >= 1 ? closed : hiLevel > 0.5 ? sf[kHi] <= 1 - hiLevel : cdf[kHi] >= hiLevel;
      err[i] = pi <= 0 || pi >= 1 ? 0 : reached ? xs[kHi] - xs[k] : Infinity;
    }
    if (es && esErr) {
      if (pi >= 1) {
        es[i] = out[i];
        continue;
      }
      let ex = 0;
      for (let j = n - 1; j > k; j--) ex += Math.max(probs[j], 0) * (xs[j] - xs[k]);
      es[i] = xs[k] + ex / (1 - pi);
      esErr[i] = ((errCdf * (Math.abs(xs[n - 1] - xs[k]) + err[i]) + 4 * Number.EPSILON * Math.abs(ex)) / (1 - pi)) * 2;
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
