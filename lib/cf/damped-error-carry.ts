/**
 * Per-frequency CF errors of sums and mixtures (Node.dampedErrorAt, absolute; Node.dampedRelErrorAt, relative) from their
 * terms', where at least one term bounds its damped transform's error per frequency (the quadrature severities, and
 * compounds of them); the others count with their constant bounds. Each follows the constant rule it refines.
 */
import type { Node } from "./node";

type At = (beta: number, t: number) => number;

/** the node's absolute error at (beta, t) for its own dampedLogCf: its per-frequency bound where valid, else the constant */
function absAt(c: Node): At | number {
  const e = c.dampedErrorAt;
  const whole = c.cfAbsError ?? 0;
  return e && e.cf === c.dampedLogCf ? (beta, t) => Math.min(whole, e.at(beta, t)) : whole;
}

function relAt(c: Node): At | number {
  const e = c.dampedRelErrorAt;
  const whole = c.cfRelError ?? 0;
  return e && e.cf === c.dampedLogCf ? (beta, t) => Math.min(whole, e.at(beta, t)) : whole;
}

const perFrequency = (xs: (At | number)[]) => xs.some((x) => typeof x === "function");
const value = (x: At | number, beta: number, t: number) => (typeof x === "function" ? x(beta, t) : x);

/**
 * Independent sum (log phi = sum log phi_i; sumNode's constants: absolute errors add, each term's other factors of modulus
 * at most 1, and relative ones add, to first order as there): the same sums of the terms' bounds at (beta, t), at most
 * the node's constants.
 */
export function carrySumErrors(node: Node, cs: Node[]): void {
  const cf = node.dampedLogCf;
  if (!cf) return;
  const abs = cs.map(absAt);
  const rel = cs.map(relAt);
  const wholeAbs = node.cfAbsError ?? 0;
  const wholeRel = node.cfRelError ?? 0;
  if (perFrequency(abs)) node.dampedErrorAt = { cf, at: (beta, t) => Math.min(wholeAbs, abs.reduce<number>((s, x) => s + value(x, beta, t), 0) * (1 + cs.length * Number.EPSILON)) };
  if (perFrequency(rel)) node.dampedRelErrorAt = { cf, at: (beta, t) => Math.min(wholeRel, rel.reduce<number>((s, x) => s + value(x, beta, t), 0) * (1 + cs.length * Number.EPSILON)) };
}

/**
 * Mixture (phi = sum w_j phi_j; mixNode's constant: sum w_j (abs_j + rel_j), as |phi_j| <= 1): the same weighted sum of
 * the parts' bounds at (beta, t), at most the constant.
 */
export function carryMixErrors(node: Node, ws: number[], cs: Node[]): void {
  const cf = node.dampedLogCf;
  if (!cf) return;
  const abs = cs.map(absAt);
  const rel = cs.map(relAt);
  if (!perFrequency(abs) && !perFrequency(rel)) return;
  const whole = node.cfAbsError ?? 0;
  node.dampedErrorAt = {
    cf,
    at: (beta, t) => Math.min(whole, ws.reduce((s, w, j) => s + w * (value(abs[j], beta, t) + value(rel[j], beta, t)), 0) * (1 + 2 * (cs.length + 1) * Number.EPSILON)),
  };
}

/**
 * aX, a > 0 (scaleDamped: the part's values at the rounded (a beta, a t)): the part's bounds at the same doubles (the
 * arguments' own rounding is not the CF's error here, as for the constant scaleNode keeps)
 */
export function carryScaleErrors(node: Node, a: number, c: Node): void {
  const cf = node.dampedLogCf;
  if (!cf || !(a > 0)) return;
  const abs = absAt(c);
  const rel = relAt(c);
  if (typeof abs === "function") node.dampedErrorAt = { cf, at: (beta, t) => abs(a * beta, a * Math.abs(t)) };
  if (typeof rel === "function") node.dampedRelErrorAt = { cf, at: (beta, t) => rel(a * beta, a * Math.abs(t)) };
}

/**
 * X + b (shiftDamped: the values times e^{(i t - beta) b}): relative errors unchanged; absolute ones times e^{-beta b},
 * carried for b >= 0 only (there at most the constant shiftNode keeps)
 */
export function carryShiftErrors(node: Node, b: number, c: Node): void {
  const cf = node.dampedLogCf;
  if (!cf) return;
  const abs = absAt(c);
  const rel = relAt(c);
  if (typeof abs === "function" && b >= 0) node.dampedErrorAt = { cf, at: (beta, t) => abs(beta, t) * Math.exp(-beta * b) * (1 + 4 * Number.EPSILON) };
  if (typeof rel === "function") node.dampedRelErrorAt = { cf, at: rel };
}
