/**
 * The operators' and tables' cumulants in running-error arithmetic (moment-error.ts), step for step as the nodes
 * compute them (operators.ts, mix-node.ts, compound.ts, tabulated.ts). Each operator starts from its children's
 * reported cumulants with their bounds (cumulant-bounds.ts), so a bound covers the whole tree below.
 */
import type { Node } from "./node";
import { checkDeadline } from "./deadline";
import { cumulantEst } from "./cumulant-bounds";
import { add, cumulantsToRawE, div, exact, mul, powInt, rawToCumulantsE, sub, type Est, type EstList } from "./moment-error";

const E0 = exact(0);

/** independent sum: cumulants add */
export const sumE = (cs: Node[]) => (n: number): EstList => {
  const lists = cs.map((c) => cumulantEst(c, n));
  const out: EstList = new Array(n).fill(E0);
  for (const l of lists) for (let k = 0; k < n; k++) out[k] = out[k] === null || l[k] === null ? null : add(out[k] as Est, l[k] as Est);
  return out;
};

/** a X: kappa_k a^k */
export const scaleE = (a: number, c: Node) => (n: number): EstList => cumulantEst(c, n).map((v, k) => (v === null ? null : mul(v, powInt(exact(a), k + 1))));

/** X + b: kappa_1 + b */
export const shiftE = (b: number, c: Node) => (n: number): EstList => cumulantEst(c, n).map((v, k) => (k === 0 && v !== null ? add(v, exact(b)) : v));

/** n copies: n kappa_k */
export const repeatE = (m: number, c: Node) => (n: number): EstList => cumulantEst(c, n).map((v) => (v === null ? null : mul(exact(m), v)));

/** mixture: raw moments mix with the weights as given */
export const mixE = (ws: number[], cs: Node[]) => (n: number): EstList => {
  const raws = cs.map((c) => cumulantsToRawE(cumulantEst(c, n)));
  const mixed: EstList = [];
  for (let k = 0; k < n; k++) {
    let s: Est | null = E0;
    for (let j = 0; j < cs.length; j++) s = s === null || raws[j][k] === null ? null : add(s, mul(exact(ws[j]), raws[j][k] as Est));
    mixed.push(s);
  }
  return rawToCumulantsE(mixed);
};

/**
 * compound: with a_k = kappa_k(X)/k! and b_j = kappa_j(N)/j!, kappa_m(S) = m! sum_j b_j [u^m] A(u)^j (the cumulant
 * function of S is K_N(K_X(u)); Klugman, Panjer & Willmot, Loss Models, sec. 9.3, composition of generating functions)
 */
export const compoundE = (N: Node, X: Node) => (n: number): EstList => {
  const kx = cumulantEst(X, n);
  const kn = cumulantEst(N, n);
  let valid = n;
  for (let k = 0; k < n; k++)
    if (kx[k] === null || kn[k] === null) {
      valid = k;
      break;
    }
  const out: EstList = new Array(n).fill(null);
  if (valid === 0) return out;
  const A: Est[] = [E0];
  let f = exact(1);
  for (let k = 1; k <= valid; k++) {
    f = mul(f, exact(k));
    A.push(div(kx[k - 1] as Est, f));
  }
  const c: Est[] = new Array(valid + 1).fill(E0);
  let pow: Est[] = new Array(valid + 1).fill(E0);
  pow[0] = exact(1);
  let fj = exact(1);
  for (let j = 1; j <= valid; j++) {
    const next: Est[] = new Array(valid + 1).fill(E0);
    for (let i = 0; i <= valid; i++) {
      if (pow[i].v === 0 && pow[i].e === 0) continue;
      for (let k = 1; i + k <= valid; k++) next[i + k] = add(next[i + k], mul(pow[i], A[k]));
    }
    pow = next;
    fj = mul(fj, exact(j));
    const bj = div(kn[j - 1] as Est, fj);
    for (let m = j; m <= valid; m++) c[m] = add(c[m], mul(bj, pow[m]));
  }
  let fm = exact(1);
  for (let m = 1; m <= valid; m++) {
    fm = mul(fm, exact(m));
    out[m - 1] = mul(c[m], fm);
  }
  return out;
};

/**
 * finite discrete law at xs with probabilities ps (estimates): mean sum p x, central moments sum p (x - mean)^r,
 * cumulants from them with kappa_1 = mean (tabulated.ts atomsNode)
 */
export function atomsE(xs: Est[], ps: Est[]): (n: number) => EstList {
  let mean = E0;
  for (let j = 0; j < xs.length; j++) {
    if ((j & 4095) === 4095) checkDeadline("moment-bounds");
    mean = add(mean, mul(ps[j], xs[j]));
  }
  return (m) => {
    const central: Est[] = new Array(m).fill(E0);
    for (let j = 0; j < xs.length; j++) {
      if ((j & 4095) === 4095) checkDeadline("moment-bounds");
      const d = sub(xs[j], mean);
      let pw = d;
      for (let r = 2; r <= m; r++) {
        pw = mul(pw, d);
        central[r - 1] = add(central[r - 1], mul(ps[j], pw));
      }
    }
    const k = rawToCumulantsE(central);
    if (m > 0) k[0] = mean;
    return k;
  };
}

/** probabilities normalised by their computed total: p_j / sum p (the total's own summation error carried) */
export function normalisedE(mass: ArrayLike<number>): Est[] {
  let total = E0;
  for (let j = 0; j < mass.length; j++) total = add(total, exact(mass[j]));
  return Array.from(mass, (v) => div(exact(v), total));
}

/** lattice law origin + k step with probabilities p (as given, normalised to sum 1) */
export function latticeE(origin: number, step: number, p: ArrayLike<number>): (n: number) => EstList {
  return lazy(() => latticeAtoms(origin, step, p));
}

/** built on first use only: compiling a model for any other endpoint pays nothing */
function lazy(make: () => (n: number) => EstList): (n: number) => EstList {
  let f: ((n: number) => EstList) | null = null;
  return (n) => (f ??= make())(n);
}

function latticeAtoms(origin: number, step: number, p: ArrayLike<number>): (n: number) => EstList {
  const xs: Est[] = [];
  const keep: number[] = [];
  for (let k = 0; k < p.length; k++)
    if (p[k] > 0) {
      keep.push(p[k]);
      xs.push(add(exact(origin), mul(exact(k), exact(step))));
    }
  return atomsE(xs, normalisedE(keep));
}

/** a sample (values with optional positive weights) as the law that puts mass w_j / sum w at each value */
export function sampleE(values: number[], weights?: number[]): (n: number) => EstList {
  return lazy(() => sampleAtoms(values, weights));
}

function sampleAtoms(values: number[], weights?: number[]): (n: number) => EstList {
  const xs: Est[] = [];
  const mass: number[] = [];
  values.forEach((v, j) => {
    const w = weights ? weights[j] : 1;
    if (!(w > 0)) return;
    xs.push(exact(v));
    mass.push(w);
  });
  return atomsE(xs, normalisedE(mass));
}
