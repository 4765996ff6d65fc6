import { cabs } from "../complex";
import type { Atom, CompiledModel, TailTerm } from "../types";
import { directPoint } from "../direct/types";
import { gammaPdf, incGamma } from "./incgamma";

/**
 * Gamma kernels at a finite support endpoint, subtracted from the CF so that what is left decays faster in t.
 * A density with f(lo+) != 0 has phi(t) e^{-it lo} ~ sum_j f^{(j-1)}(lo+) (-it)^{-j} (integration by parts,
 * e.g. Lukacs, Characteristic Functions, ch. 2); subtracting sum_m b_m e^{it lo} (1 - i t / lambda)^{-m}
 * with matching expansion leaves a remainder whose inversion converges quickly. The kernels are inverted
 * in closed form (Erlang cdf).
 */
export interface EndpointKernels {
  /** endpoint and side: +1 kernels live on [at, inf), -1 on (-inf, at] */
  at: number;
  side: 1 | -1;
  rate: number;
  /** exponent of the first kernel: kernel j is Gamma(power + j, rate) (power 1 gives Erlang kernels) */
  power: number;
  /** amplitudes b_0..b_{J-1} */
  b: number[];
}

/** The continuous part handed to the inversion sums: (phi - sum atoms)/w minus kernels, recentred at `center`. */
export interface ContinuousPart {
  model: CompiledModel;
  atoms: Atom[];
  /** 1 - sum of atom masses */
  weight: number;
  /** x-origin of the phases (reduces angle size and rounding) */
  center: number;
  kernels: EndpointKernels[];
  /** total mass of the measure actually inverted (1 minus kernel masses) */
  mass: number;
  /** absolute error of the model's CF values where it states one (numerical CFs), else 0 */
  cfAbsError: number;
  /** the heaviest-tailed term G of a sum, subtracted from the CF and added back from its direct law */
  tail?: TailTerm;
}

/**
 * Relative error of one CF value phi = exp(L) e^{-i t c} computed from the model's log-CF L: each node of the tree
 * computes its part of L to `ulps` units of rounding relative to 1 + |Re L| + |Im L| (closed forms of a few operations;
 * terms of a sum add with no cancellation in Re L <= 0), exp(Re L) adds |Re L| u + u, cos and sin of Im L add
 * |Im L| u + 2u, and the recentring phase t c adds 2 |t c| u (Higham, Accuracy and Stability of Numerical Algorithms,
 * 2nd ed., sec. 2.2 and 3.1: one rounding per elementary operation, errors of the argument carried through exp, cos, sin).
 */
export function cfRelError(ulps: number, lr: number, li: number, t: number, center: number): number {
  return Number.EPSILON * ((ulps + 1) * (1 + Math.abs(lr) + Math.abs(li)) + 2 * Math.abs(t * center) + 3);
}

/** units of rounding of the model's log-CF relative to 1 + |L|: 8 per node of the tree plus what special functions add */
export function cfUlps(model: CompiledModel): number {
  return model.logCfUlps ?? 8 * Math.max(1, model.nodes);
}

/** The model's typed bound on the absolute error of its CF values. */
export function declaredCfError(model: CompiledModel): number {
  // |phi| <= 1: a relative error bound is an absolute one too
  // a model that declares no finite bound (a compound of a numerical severity with a count without a mean) has none: it
  // is not read as exact, so the inversion's bounds say so
  const e = (model.cfAbsError ?? 0) + (model.cfRelError ?? 0);
  return e >= 0 ? e : Infinity;
}

export function makePart(model: CompiledModel, atoms: Atom[], center: number): ContinuousPart {
  let pa = 0;
  for (const a of atoms) pa += a.p;
  return { model, atoms, weight: 1 - pa, center, kernels: [], mass: 1, cfAbsError: declaredCfError(model) };
}

export function withKernels(part: ContinuousPart, ks: EndpointKernels[]): ContinuousPart {
  // the measure before the kernels: mass 1, or 0 with the heaviest term's law taken out (withTailLaw)
  let m = part.tail ? 0 : 1;
  for (const k of ks) for (const b of k.b) m -= b;
  return { ...part, kernels: ks, mass: m };
}

/**
 * Subtract the sum's heaviest-tailed term G = D + E[rest] (model.tailTerm): the part's power tails then start at the
 * remainder's index. Only for parts without atoms (the tail term is a continuous law of the whole sum).
 */
export function withTailLaw(part: ContinuousPart): ContinuousPart {
  const term = part.model.tailTerm;
  if (!term || part.atoms.length > 0 || part.tail) return part;
  // |phi_G| <= 1: the difference's rounding, and G's own CF error, count at every node
  return { ...part, tail: term, mass: part.mass - 1, cfAbsError: part.cfAbsError + term.cfAbsError + 8 * Number.EPSILON };
}

/** G's pdf, cdf, sf at x from its direct law, with their bounds. */
export function tailLawAt(term: TailTerm, x: number): { pdf: number; cdf: number; sf: number; errCdf: number; errPdf: number } {
  const o = directPoint();
  term.direct.at(x, o);
  return { pdf: o.pdf, cdf: o.cdf, sf: o.sf, errCdf: Math.max(o.cdfErr, o.sfErr), errPdf: o.pdfErr };
}

/**
 * phi_part(t) = [ (phi(t) - sum_j p_j e^{i t x_j}) / w  -  kernels(t) - phi_G(t) ] e^{-i t c}, written into (re, im);
 * with `rel` the relative error of each phi(t) as computed from its log (cfRelError), with `mod` its modulus e^{Re L}.
 * Scratch-free apart from what the model needs; called once per node block, never per x.
 */
export function evalPart(
  part: ContinuousPart,
  t: Float64Array,
  re: Float64Array,
  im: Float64Array,
  rel?: Float64Array,
  logCf?: { re: Float64Array; im: Float64Array },
  mod?: Float64Array,
): void {
  const n = t.length;
  // the model's log-CF at t, unless the caller has it already (probeEnvelope keeps it per model)
  if (logCf) {
    re.set(logCf.re);
    im.set(logCf.im);
  } else part.model.logCf(t, re, im);
  const ulps = cfUlps(part.model);
  const extra = part.model.logCfExtraError;
  const c = part.center;
  // nothing subtracted: the recentring phase joins Im L, one cos and sin per node instead of two (the angle
  // Im L - t c carries |Im L| u + 2 |t c| u, inside what cfRelError allows for Im L and the recentring)
  const plain = part.atoms.length === 0 && part.kernels.length === 0 && !part.tail;
  const c0 = plain ? c : 0;
  for (let i = 0; i < n; i++) {
    const lr = re[i];
    const li = im[i];
    if (rel) rel[i] = cfRelError(ulps, lr, li, t[i], c) + (extra ? extra(t[i]) : 0);
    const m = Math.exp(lr);
    if (mod) mod[i] = m;
    if (m === 0 || Number.isNaN(m)) {
      re[i] = m === 0 ? 0 : NaN;
      im[i] = m === 0 ? 0 : NaN;
    } else {
      const a = li - t[i] * c0;
      re[i] = m * Math.cos(a);
      im[i] = m * Math.sin(a);
    }
  }
  if (plain) return;
  const atoms = part.atoms;
  const invW = 1 / part.weight;
  const ks = part.kernels;
  let gr: Float64Array | null = null;
  let gi: Float64Array | null = null;
  if (part.tail) {
    gr = new Float64Array(n);
    gi = new Float64Array(n);
    part.tail.logCf(t, gr, gi);
  }
  const gShift = part.tail ? part.tail.shift : 0;
  for (let i = 0; i < n; i++) {
    const ti = t[i];
    let r = re[i];
    let m = im[i];
    for (let j = 0; j < atoms.length; j++) {
      const a = ti * atoms[j].x;
      r -= atoms[j].p * Math.cos(a);
      m -= atoms[j].p * Math.sin(a);
    }
    if (atoms.length) {
      r *= invW;
      m *= invW;
    }
    for (let kk = 0; kk < ks.length; kk++) {
      const k = ks[kk];
      // (1 - i s t/lambda)^{-m} for m = 1..J via repeated division; s = side
      const ur = 1;
      const ui = (-k.side * ti) / k.rate;
      const den = ur * ur + ui * ui;
      const vr = ur / den;
      const vi = -ui / den; // v = 1/(1 - i s t/lambda)
      // v^power by polar form (principal branch: Re v > 0), then one more factor v per kernel
      const mag = Math.pow(cabs(vr, vi), k.power);
      const arg = Math.atan2(vi, vr) * k.power;
      let pr = k.power === 1 ? vr : mag * Math.cos(arg);
      let pi = k.power === 1 ? vi : mag * Math.sin(arg);
      let sr = 0;
      let si = 0;
      for (let q = 0; q < k.b.length; q++) {
        if (q > 0) {
          const nr = pr * vr - pi * vi;
          pi = pr * vi + pi * vr;
          pr = nr;
        }
        sr += k.b[q] * pr;
        si += k.b[q] * pi;
      }
      const ca = Math.cos(ti * k.at);
      const sa = Math.sin(ti * k.at);
      r -= sr * ca - si * sa;
      m -= sr * sa + si * ca;
    }
    if (gr && gi) {
      const mg = Math.exp(gr[i]);
      const ag = gi[i] + ti * gShift;
      r -= mg * Math.cos(ag);
      m -= mg * Math.sin(ag);
    }
    if (c !== 0) {
      const ca = Math.cos(ti * c);
      const sa = Math.sin(ti * c);
      const nr = r * ca + m * sa;
      m = m * ca - r * sa;
      r = nr;
    }
    re[i] = r;
    im[i] = m;
  }
}

/** Erlang(m, rate) cdf and sf at y >= 0 by the finite Poisson sum (Abramowitz & Stegun 26.4.21 with integer shape). */
export function erlangTails(m: number, rate: number, y: number): { cdf: number; sf: number; pdf: number } {
  if (y <= 0) return { cdf: 0, sf: 1, pdf: 0 };
  const z = rate * y;
  const e = Math.exp(-z);
  let term = 1;
  let s = 0;
  for (let n = 0; n < m; n++) {
    if (n > 0) term *= z / n;
    s += term;
  }
  const sf = e * s;
  // term is z^{m-1}/(m-1)!
  const pdf = rate * e * term;
  // cdf computed as 1 - sf except when sf ~ 1, where the complementary series is more accurate
  let cdf = 1 - sf;
  if (sf > 0.5) {
    let t2 = term * z / m;
    let c = 0;
    for (let n = m; n < m + 200; n++) {
      c += t2;
      t2 *= z / (n + 1);
      if (t2 < c * 1e-17) break;
    }
    cdf = e * c;
  }
  return { cdf, sf, pdf };
}

/** Kernel contributions to pdf, cdf, sf at x (sum over b_m times the gamma laws at the endpoint). */
export function kernelAt(k: EndpointKernels, x: number): { pdf: number; cdf: number; sf: number } {
  const y = k.side * (x - k.at);
  let pdf = 0;
  let lower = 0;
  let upper = 0;
  for (let q = 0; q < k.b.length; q++) {
    const a = k.power + q;
    if (Number.isInteger(a)) {
      const e = erlangTails(a, k.rate, y);
      pdf += k.b[q] * e.pdf;
      lower += k.b[q] * e.cdf;
      upper += k.b[q] * e.sf;
    } else if (y > 0) {
      const g = incGamma(a, k.rate * y);
      pdf += k.b[q] * gammaPdf(a, k.rate, y);
      lower += k.b[q] * g.P;
      upper += k.b[q] * g.Q;
    } else {
      upper += k.b[q];
    }
  }
  // for side -1 the Erlang variable is at - X, so its cdf is our sf
  return k.side === 1 ? { pdf, cdf: lower, sf: upper } : { pdf, cdf: upper, sf: lower };
}
