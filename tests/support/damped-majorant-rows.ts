// One fixture row of a damped majorant's check (tests/fixtures/damped-majorant: mpmath |psi| and |psi'| at (beta, t) with
// the generator's cross-check difference): rest >= |psi|, slope >= |psi'|, and the decay form's bound at 10 t at least the
// rest there. Returns |psi| / rest and |psi'| / slope, for the callers' tightness checks.
import { expect } from "vitest";
import type { DampedMajorant } from "@/lib/cf/damped-majorant";

export interface MajorantRow {
  beta: string | number;
  t: string | number;
  abs: string | number;
  slope: string | number;
  check: number;
}

export function majorantRowHolds(m: Pick<DampedMajorant, "rest" | "slope" | "decay">, r: MajorantRow, at: string): { rest: number; slope: number } {
  const beta = Number(r.beta);
  const t = Number(r.t);
  const rest = m.rest(beta, t);
  const slope = m.slope(beta, t);
  expect(Number(r.abs), `${at}: |psi| vs rest ${rest}`).toBeLessThanOrEqual(rest + r.check);
  expect(Number(r.slope), `${at}: |psi'| vs slope ${slope}`).toBeLessThanOrEqual(slope + r.check);
  // the tail past t0 = t: rest(t') <= R (t / t')^q, checked at t' = 10 t against the bound there
  const d = m.decay(beta, t);
  expect(d.R * Math.pow(0.1, d.q), `${at}: the decay's bound at 10 t`).toBeGreaterThanOrEqual(m.rest(beta, 10 * t) * (1 - 1e-12));
  return { rest: Number(r.abs) / rest, slope: Number(r.slope) / slope };
}
