// Shared checks of a claim law's log rounding against an mpmath fixture row set (tests/fixtures/arg-rounding/*-log.json:
// phi at t, |phi|, log|phi|, the argument unwrapped on a 0.005 grid, |phi| |L| and the two methods' difference), used by
// the logarithmic, zero-modified and lattice-table claim tests. The Poisson(1) count's factor is its pgf's derivative,
// e^{Re phi - 1} in modulus (Loss Models, app. B).
import { expect } from "vitest";
import { compile } from "@/lib/cf/compile";
import type { Node } from "@/lib/cf/node";
import type { CompiledModel, Model } from "@/lib/cf/types";
import { cfValueErrors } from "./cf-value-errors";

export interface LogRoundRow { t: number; re: string; im: string; absPhi: number; logAbs: number; theta: number; phiTimesLog: number; crossCheck: number }

const U8 = 8 * Number.EPSILON;
const poissonOne = (claim: Model) => compile({ compound: { count: { family: "poisson", lambda: 1 }, each: claim } } as unknown as Model);

/**
 * 8 u |phi| |L| of the reference (continuous and principal branch) lies within the Poisson(1) compound's cfArgErrAt times
 * e^{Re phi - 1} and within its slope R t at every row; the closest row comes within 10x, and where |phi| |L| > 0.01 the
 * bound stays within `within` of it. The compound no longer says the term is left out.
 */
export function expectClaimRoundingCovers(claim: Model, rows: readonly LogRoundRow[], within: number): void {
  const node = poissonOne(claim);
  expect(node.notes.some((n) => n.includes("not derived for this claim law"))).toBe(false);
  let closest = 0;
  let worst = 0;
  // the compound's slope is E N R = R (Poisson(1)), the claim law's own
  const R = node.cfArgSlope ?? 0;
  for (const r of rows) {
    const principal = Math.atan2(Number(r.im), Number(r.re));
    const need = U8 * Math.max(r.phiTimesLog, r.absPhi * Math.hypot(r.logAbs, principal));
    const dP = Math.exp(Number(r.re) - 1);
    const b = node.cfArgErrAt!(r.t);
    expect(b, `t ${r.t}`).toBeGreaterThanOrEqual(dP * need);
    expect(R * r.t, `t ${r.t}`).toBeGreaterThanOrEqual(need);
    closest = Math.max(closest, (dP * need) / b);
    if (r.phiTimesLog > 0.01) worst = Math.max(worst, b / (dP * need));
  }
  expect(closest).toBeGreaterThan(0.1);
  expect(worst).toBeLessThan(within);
}

/** The law's own e^L on the 0.005 grid lies within its CF allowance plus the claim rounding of the reference, its phase on the continuous branch. */
export function expectLogCfOnBranch(claim: Model, rows: readonly LogRoundRow[]): void {
  const m = compile(claim);
  const t = Float64Array.from({ length: 10000 }, (_, i) => (i + 1) * 0.005);
  const re = new Float64Array(t.length);
  const im = new Float64Array(t.length);
  m.logCf(t, re, im);
  const node = poissonOne(claim);
  for (const r of rows) {
    const j = Math.round(r.t / 0.005) - 1;
    const { err, own } = cfValueErrors(m, re[j], im[j], r.t, [Number(r.re), Number(r.im)]);
    const claimRound = node.cfArgErrAt!(r.t) / Math.exp(Number(r.re) - 1);
    expect(err, `t ${r.t}`).toBeLessThanOrEqual(own + claimRound + r.crossCheck);
    expect(Math.abs(im[j] - r.theta), `t ${r.t}`).toBeLessThan(1e-9);
  }
}

/** A node's e^L on the grid t = 0.05 k (k <= 1000) within its cfAbsError plus logRoundAt of the reference, its phase on the continuous branch (Weibull, Burr). */
export function expectNodeLogCfOnGrid(node: Node, rows: readonly LogRoundRow[]): void {
  const h = 0.05;
  const K = 1000;
  const t = Float64Array.from({ length: K }, (_, i) => (i + 1) * h);
  const re = new Float64Array(K);
  const im = new Float64Array(K);
  node.logCf(t, re, im);
  for (const r of rows) {
    const j = Math.round(r.t / h) - 1;
    if (j < 0 || Math.abs(t[j] - r.t) > 1e-12) continue;
    const v = Math.exp(re[j]);
    const d = Math.hypot(v * Math.cos(im[j]) - Number(r.re), v * Math.sin(im[j]) - Number(r.im));
    expect(d, `t ${r.t}`).toBeLessThanOrEqual(node.cfAbsError! + node.logRoundAt!(r.t, node) + r.crossCheck);
    expect(Math.abs(im[j] - r.theta), `t ${r.t}`).toBeLessThan(1e-6);
  }
}

/**
 * A compound of the claim law carries its rounding: no "left out" note, and |P_N'(phi_X)| 8 u |phi_X| |L_X| (dP the
 * count's pgf derivative in modulus at the reference's phi) within the lesser of its slope and cfArgErrAt at every row,
 * the closest within 80x.
 */
export function expectCompoundCarriesRounding(m: CompiledModel, rows: readonly LogRoundRow[], dP: (re: number, im: number) => number): void {
  expect(m.notes.some((n) => n.includes("not derived for this claim law"))).toBe(false);
  let closest = 0;
  for (const r of rows) {
    const need = dP(Number(r.re), Number(r.im)) * U8 * r.phiTimesLog;
    const b = Math.min((m.cfArgSlope ?? 0) * r.t, m.cfArgErrAt!(r.t));
    expect(b, `t ${r.t}`).toBeGreaterThanOrEqual(need);
    closest = Math.max(closest, need / b);
  }
  expect(closest).toBeGreaterThan(0.1 / 8);
}

/**
 * A claim node's own logRoundAt covers 8 u |phi| |L| of the reference (continuous and principal branch) at every row and
 * lies within its slope R t, which covers it too; the closest row comes within 10x (a bound cut by 10 fails), and where
 * |phi| |L| > 0.01 the bound stays within `within` of it (Weibull, Burr).
 */
export function expectLogRoundCovers(node: Node, rows: readonly LogRoundRow[], within: number): void {
  const R = node.logRoundSlope!;
  expect(Number.isFinite(R)).toBe(true);
  let closest = 0;
  let worst = 0;
  for (const r of rows) {
    const b = node.logRoundAt!(r.t, node);
    const principal = Math.atan2(Number(r.im), Number(r.re));
    const need = U8 * Math.max(r.phiTimesLog, r.absPhi * Math.hypot(r.logAbs, principal));
    expect(b, `t ${r.t}: bound ${b}, 8 u |phi| |L| ${need}`).toBeGreaterThanOrEqual(need);
    expect(R * r.t, `t ${r.t}`).toBeGreaterThanOrEqual(need);
    expect(b).toBeLessThanOrEqual(R * r.t);
    closest = Math.max(closest, need / b);
    if (r.phiTimesLog > 0.01) worst = Math.max(worst, b / need);
  }
  expect(closest).toBeGreaterThan(0.1);
  expect(worst).toBeLessThan(within);
}
