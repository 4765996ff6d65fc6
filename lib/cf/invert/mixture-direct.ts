import type { CompiledModel } from "../types";
import { directPoint } from "../direct/types";
import { directShortfalls, momentRest, type RestBound } from "../direct/shortfall";
import type { Component, Value } from "./mixture-component";

// A mixture's component with a directly evaluated law (closed form, special function, stable integral).

export function directComponent(w: number, m: CompiledModel): Component {
  const law = m.direct!;
  const pt = directPoint();
  const mean = m.momentIndex > 1 ? m.cumulants(1)[0] : null;
  // formed at the first ES asked (Infinity where no bound is known: the shortfall then takes the upper tail's integral)
  let meanErr: number | undefined;
  // the derived bound on the tail past the shortfall sweep's last node, formed at the first ES asked
  let rest: RestBound | null | undefined;
  const at = (x: number): Value => {
    law.at(x, pt);
    return { F: pt.cdf, S: pt.sf, f: pt.pdf, eF: pt.cdfErr, eS: pt.sfErr };
  };
  const excesses = (qs: readonly number[], allow?: readonly number[]): ({ value: number; error: number } | null)[] => {
    if (mean === null || !Number.isFinite(mean) || !(m.tails.right > 1)) return qs.map(() => null);
    const out: ({ value: number; error: number } | null)[] = [];
    // directShortfalls gives q + E[(X - q)^+] / (1 - p) with p the component's own level at q; the points inside the
    // tail go in one call, which shares one sweep of the tail on each side among them
    const ps: number[] = [];
    const inside: number[] = [];
    for (let i = 0; i < qs.length; i++) {
      const v = at(qs[i]);
      const p = Math.min(Math.max(v.F, 0), 1);
      ps.push(p);
      if (p >= 1 || v.S <= 0) out[i] = { value: 0, error: v.eS * Math.max(law.spread, 1) };
      else inside.push(i);
    }
    if (inside.length === 0) return out;
    if (rest === undefined) rest = momentRest(m) ?? null;
    if (meanErr === undefined) meanErr = m.cumulantErrors?.(1)[0] ?? Infinity;
    const sub = inside.map((i) => qs[i]);
    const r = directShortfalls(
      law,
      sub,
      new Float64Array(sub.length),
      inside.map((i) => ps[i]),
      m.tails,
      mean,
      meanErr,
      rest ?? undefined,
      allow ? inside.map((i) => allow[i]) : undefined,
    );
    // E[(X - q)^+] as the shortfall formed it (taking it back from q + excess / (1 - p) cost 4 eps |q| of rounding)
    inside.forEach((i, k) => {
      out[i] = Number.isFinite(r.excess[k]) ? { value: r.excess[k], error: r.excessError[k] } : { value: NaN, error: Infinity };
    });
    return out;
  };
  return {
    w,
    atoms: (law.atoms ?? []).map((a) => ({ x: a.x, p: a.p })),
    atomErr: (law.atoms ?? []).reduce((s, a) => s + a.pErr, 0),
    at,
    excess(q) {
      return excesses([q])[0];
    },
    excesses,
    terms: () => 0,
    notes: () => law.notes,
    method: law.method,
  };
}
