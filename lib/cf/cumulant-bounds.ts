/** Attaching and reading the running-error cumulants of a node (moment-error.ts): one place for every node kind. */
import type { Node } from "./node";
import { type Est, type EstList } from "./moment-error";

/** Give a node the running-error form of its cumulants, paired with the cumulants function it has now. */
export function withCumulantErrors<T extends Node>(node: T, at: (n: number) => EstList): T {
  node.cumulantErrors = { of: node.cumulants, at };
  return node;
}

/**
 * The node's reported cumulants kappa_1..kappa_n as estimates: v the value cumulants(n) returns, e a bound on its
 * error (the running bound plus the distance between the two computations). Infinity where no bound is derived
 * (a node without running-error cumulants, or one whose cumulants were replaced after they were attached); null
 * where the cumulant is null.
 */
export function cumulantEst(node: Node, n: number): EstList {
  const vals = node.cumulants(n);
  const ce = node.cumulantErrors;
  const ests = ce && ce.of === node.cumulants ? ce.at(n) : null;
  return vals.map((v, k) => {
    if (v === null) return null;
    const r = ests ? ests[k] : null;
    if (!r) return { v, e: Infinity };
    const e = r.e + Math.abs(v - r.v);
    return { v, e: Number.isFinite(e) ? e * (1 + 2 ** -48) : Infinity } satisfies Est;
  });
}
