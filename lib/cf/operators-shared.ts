/** Pieces shared by the operator nodes (operators.ts, mix-node.ts): notes, approximation carry, cumulants, atoms. */
import type { Node, NodeKind } from "./node";
import { convolveAtoms, MAX_ATOMS, mergeAtoms } from "./kinds";
import type { Atom } from "./types";

export const collectNotes = (cs: Node[]) => [...new Set(cs.flatMap((c) => c.notes))];

/**
 * A table built from approximate tables (discretised compounds) is approximate too; its cdf error is at most the
 * weighted sum of the parts' errors (sup |F*G - F'*G'| <= sup |F - F'| + sup |G - G'|; mixtures average).
 */
export function carryApproximation(node: Node, cs: Node[], weights: number[]): Node {
  if (!node.table || !cs.some((c) => c.approximate)) return node;
  const inner = node.table;
  node.approximate = true;
  node.table = (maxLength) => {
    const t = inner(maxLength);
    if (!t) return null;
    let err = 0;
    cs.forEach((c, j) => {
      if (c.approximate) err += weights[j] * (c.table!(maxLength)?.cdfError ?? Infinity);
    });
    return { ...t, cdfError: err };
  };
  return node;
}

/** Width measure that adds correctly for finite variance (root sum of squares) and conservatively otherwise. */
export function combineScales(cs: Node[]): number {
  if (cs.every((c) => c.momentIndex > 2)) return Math.sqrt(cs.reduce((s, c) => s + c.scale * c.scale, 0));
  return cs.reduce((s, c) => s + c.scale, 0);
}

export function addCumulants(lists: (number | null)[][], n: number): (number | null)[] {
  const out: (number | null)[] = new Array(n).fill(0);
  for (const l of lists) for (let k = 0; k < n; k++) out[k] = out[k] === null || l[k] === null ? null : (out[k] as number) + (l[k] as number);
  return out;
}

/** Atoms of a node's discrete part, from its kind or, for infinite lattices, from its table (mass > 0 entries). */
export function discreteAtoms(node: Node): { atoms: Atom[]; complete: boolean } | null {
  const k = node.kind;
  if (k.type === "continuous") return { atoms: [], complete: true };
  if (k.type === "mixed") return { atoms: k.atoms, complete: k.atomsComplete };
  if (k.atoms) return { atoms: k.atoms, complete: true };
  const t = node.table?.(MAX_ATOMS);
  if (!t) return null;
  const atoms: Atom[] = [];
  for (let i = 0; i < t.p.length; i++) if (t.p[i] > 0) atoms.push({ x: t.origin + i * t.step, p: t.p[i] });
  return { atoms, complete: t.tailMass <= 1e-16 };
}

/** Re-list the atoms of a mixed sum or mixture whose kinds alone could not (infinite lattice components). */
export function completeAtoms(kind: NodeKind, cs: Node[], ws: number[] | null): NodeKind {
  if (kind.type !== "mixed" || kind.atomsComplete) return kind;
  const parts = cs.map(discreteAtoms);
  if (parts.some((x) => !x)) return kind;
  const ps = parts as { atoms: Atom[]; complete: boolean }[];
  let complete = ps.every((x) => x.complete);
  let atoms: Atom[] | null;
  if (ws) {
    const all: Atom[] = [];
    ps.forEach((x, j) => x.atoms.forEach((a) => all.push({ x: a.x, p: ws[j] * a.p })));
    atoms = mergeAtoms(all);
  } else {
    atoms = ps[0].atoms;
    for (let j = 1; j < ps.length && atoms; j++) atoms = convolveAtoms(atoms, ps[j].atoms);
  }
  if (!atoms || atoms.length > MAX_ATOMS) return kind;
  return { type: "mixed", atoms, atomsComplete: complete };
}

/** True when the bulk (mean + 20 sd) lies beyond maxLength steps from the table origin: a table would be useless. */
export function beyondWindow(node: Node, origin: number, step: number, maxLength: number): boolean {
  const k = node.cumulants(2);
  if (k[0] === null || k[1] === null) return false;
  return (k[0] + 20 * Math.sqrt(Math.max(k[1], 0)) - origin) / step > maxLength;
}
