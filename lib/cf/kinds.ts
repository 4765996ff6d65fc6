import type { Atom, LawKind } from "./types";
import type { NodeKind } from "./node";
import { commonStep } from "./lattice";

/** Atom lists longer than this are not enumerated (kind carries null, or an incomplete list for mixed laws). */
export const MAX_ATOMS = 4096;

/** Sort by x and merge atoms closer than a relative 1e-12. */
export function mergeAtoms(atoms: Atom[]): Atom[] {
  const s = atoms.filter((a) => a.p > 0).sort((a, b) => a.x - b.x);
  const out: Atom[] = [];
  for (const a of s) {
    const last = out[out.length - 1];
    if (last && Math.abs(a.x - last.x) <= 1e-12 * Math.max(1, Math.abs(a.x))) last.p += a.p;
    else out.push({ x: a.x, p: a.p });
  }
  return out;
}

/** Law of the sum of two independent atom sets; null when the result would exceed MAX_ATOMS. */
export function convolveAtoms(a: Atom[] | null, b: Atom[] | null): Atom[] | null {
  if (!a || !b || a.length * b.length > 4 * MAX_ATOMS) return null;
  const out: Atom[] = [];
  for (const x of a) for (const y of b) out.push({ x: x.x + y.x, p: x.p * y.p });
  const m = mergeAtoms(out);
  return m.length > MAX_ATOMS ? null : m;
}

export function atomsOf(k: NodeKind): Atom[] | null {
  return k.type === "lattice" || k.type === "discrete" ? k.atoms : k.type === "mixed" ? k.atoms : null;
}

export function sumKinds(a: NodeKind, b: NodeKind): NodeKind {
  if (a.type === "continuous" || b.type === "continuous") return { type: "continuous" };
  if (a.type === "mixed" || b.type === "mixed") {
    const complete = (a.type !== "mixed" || a.atomsComplete) && (b.type !== "mixed" || b.atomsComplete);
    const atoms = convolveAtoms(atomsOf(a), atomsOf(b));
    return atoms ? { type: "mixed", atoms, atomsComplete: complete } : { type: "mixed", atoms: [], atomsComplete: false };
  }
  const atoms = convolveAtoms(a.atoms, b.atoms);
  if (a.type === "lattice" && b.type === "lattice") {
    const g = commonStep(a.step, b.step);
    if (g !== null) return { type: "lattice", origin: a.origin + b.origin, step: g, atoms };
  }
  return { type: "discrete", atoms };
}

export function scaleKind(k: NodeKind, c: number): NodeKind {
  const sc = (atoms: Atom[] | null) => (atoms ? mergeAtoms(atoms.map((x) => ({ x: c * x.x, p: x.p }))) : null);
  switch (k.type) {
    case "continuous":
      return k;
    case "lattice":
      return { type: "lattice", origin: c * k.origin, step: Math.abs(c) * k.step, atoms: sc(k.atoms) };
    case "discrete":
      return { type: "discrete", atoms: sc(k.atoms) };
    case "mixed":
      return { type: "mixed", atoms: sc(k.atoms) ?? [], atomsComplete: k.atomsComplete };
  }
}

export function shiftKind(k: NodeKind, b: number): NodeKind {
  const sh = (atoms: Atom[] | null) => (atoms ? atoms.map((x) => ({ x: x.x + b, p: x.p })) : null);
  switch (k.type) {
    case "continuous":
      return k;
    case "lattice":
      return { type: "lattice", origin: k.origin + b, step: k.step, atoms: sh(k.atoms) };
    case "discrete":
      return { type: "discrete", atoms: sh(k.atoms) };
    case "mixed":
      return { type: "mixed", atoms: sh(k.atoms) ?? [], atomsComplete: k.atomsComplete };
  }
}

function powerAtoms(a: Atom[] | null, n: number): Atom[] | null {
  if (!a) return null;
  let result: Atom[] | null = null;
  let base: Atom[] | null = a;
  let e = n;
  while (e > 0) {
    if (e & 1) {
      result = result ? convolveAtoms(result, base) : base;
      if (!result) return null;
    }
    e >>= 1;
    if (e > 0) {
      base = convolveAtoms(base, base);
      if (!base) return null;
    }
  }
  return result;
}

export function repeatKind(k: NodeKind, n: number): NodeKind {
  if (k.type === "continuous") return k;
  const atoms = powerAtoms(atomsOf(k), n);
  switch (k.type) {
    case "lattice":
      return { type: "lattice", origin: n * k.origin, step: k.step, atoms };
    case "discrete":
      return { type: "discrete", atoms };
    case "mixed":
      return atoms ? { type: "mixed", atoms, atomsComplete: k.atomsComplete } : { type: "mixed", atoms: [], atomsComplete: false };
  }
}

export function mixKinds(ws: number[], ks: NodeKind[]): NodeKind {
  if (ks.every((k) => k.type === "continuous")) return { type: "continuous" };
  const weighted: Atom[] = [];
  let complete = true;
  ks.forEach((k, j) => {
    if (k.type === "continuous") return;
    const a = atomsOf(k);
    if (!a || (k.type === "mixed" && !k.atomsComplete)) complete = false;
    if (a) for (const x of a) weighted.push({ x: x.x, p: ws[j] * x.p });
  });
  const atoms = mergeAtoms(weighted);
  if (ks.some((k) => k.type === "continuous" || k.type === "mixed")) return { type: "mixed", atoms, atomsComplete: complete };
  const tooMany = !complete || atoms.length > MAX_ATOMS;
  if (ks.every((k) => k.type === "lattice")) {
    let g: number | null = 0;
    const o = (ks[0] as { origin: number }).origin;
    for (const k of ks) {
      if (k.type !== "lattice" || g === null) break;
      g = commonStep(g, k.step);
      if (g !== null) g = commonStep(g, k.origin - o);
    }
    if (g !== null) return { type: "lattice", origin: o, step: g, atoms: tooMany ? null : atoms };
  }
  return { type: "discrete", atoms: tooMany ? null : atoms };
}

/** Public LawKind (a single point is reported as a lattice of step 1). */
export function toLawKind(k: NodeKind): LawKind {
  switch (k.type) {
    case "continuous":
      return { type: "continuous" };
    case "lattice":
      return { type: "lattice", origin: k.origin, step: k.step === 0 ? 1 : k.step };
    case "discrete":
      return { type: "discrete", atoms: k.atoms };
    case "mixed":
      return { type: "mixed", atoms: k.atoms };
  }
}
