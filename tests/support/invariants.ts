// Invariants every answer of the engine must satisfy, whatever the model (facts of every probability law, common
// practice): 0 <= cdf <= 1 and 0 <= sf <= 1, cdf non-decreasing and cdf + sf = 1 within the stated cdf bound,
// pdf (pmf) >= -its bound, quantiles consistent with the cdf at the same model (F(q + d) >= p and F(x) <= p for
// x < q - d, within the cdf bound), quantiles and expected shortfall non-decreasing in p with ES_p >= q_p, and the
// exact moments equal to the numerical moments of the computed distribution. The engine is never its own
// reference for a value: each check compares two of its answers through an identity that holds for every law.
import { compile } from "@/lib/cf/compile";
import { isDeadlineExceeded } from "@/lib/cf/deadline";
import { density } from "@/lib/cf/invert/density";
import { quantiles } from "@/lib/cf/invert/quantile";
import { moments } from "@/lib/cf/moments";
import type { Atom, CompiledModel, Model } from "@/lib/cf/types";

export class InvariantViolation extends Error {
  constructor(what: string, model: Model, detail: Record<string, unknown>) {
    super(`${what}\n  model: ${JSON.stringify(model)}\n  ${Object.entries(detail).map(([k, v]) => `${k}: ${typeof v === "number" ? v : JSON.stringify(v)}`).join("; ")}`);
    this.name = "InvariantViolation";
  }
}

const LEVELS = [0.001, 0.05, 0.5, 0.95, 0.999];
/** relative rounding allowance of double arithmetic on a handful of operations */
const ROUND = 1e-14;

function listedAtoms(c: CompiledModel): Atom[] {
  const k = c.kind;
  if (k.type === "mixed") return k.atoms;
  if (k.type === "discrete" && k.atoms) return k.atoms;
  return [];
}

/** the evaluation points: around the law's location and scale, its support ends and (a few of) its atoms */
function points(c: CompiledModel): number[] {
  const xs = [-8, -3, -1, -0.25, 0, 0.25, 1, 3, 8].map((k) => c.location + k * c.scale);
  for (const e of c.support) if (Number.isFinite(e)) xs.push(e, e - 1e-3 * c.scale, e + 1e-3 * c.scale);
  for (const a of listedAtoms(c).slice(0, 4)) xs.push(a.x);
  return [...new Set(xs.filter(Number.isFinite))].sort((a, b) => a - b);
}

/** what is left of the level after the left limit: the largest gap below x to step under for atoms / lattices */
function stepBelow(c: CompiledModel, x: number): number {
  const k = c.kind;
  if (k.type === "lattice") return k.step / 2;
  const atoms = listedAtoms(c);
  if (atoms.length === 0) return 0;
  let below = -Infinity;
  for (const a of atoms) if (a.x < x && a.x > below) below = a.x;
  return Number.isFinite(below) ? Math.min((x - below) / 2, 1e-9 * Math.max(Math.abs(x), c.scale)) : 1e-9 * Math.max(Math.abs(x), c.scale);
}

/** cdf / sf / pdf at a handful of points, quantiles with ES at five levels and the cdf at the quantiles. */
export function checkAnswers(model: Model): void {
  const c = compile(model);
  const xs = points(c);
  const r = density(c, { x: xs });
  const e = r.diagnostics.error.cdf;
  const ep = r.diagnostics.error.pdf;
  const at = { method: r.diagnostics.method, cdfBound: e, pdfBound: ep };
  const fail = (what: string, d: Record<string, unknown>) => {
    throw new InvariantViolation(what, model, { ...d, ...at });
  };
  if (!(e >= 0) || !(ep >= 0)) fail("the stated bounds are not non-negative numbers", {});
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i];
    const F = r.cdf[i];
    const S = r.sf[i];
    if (!(F >= 0 && F <= 1)) fail("cdf outside [0, 1]", { x, cdf: F });
    if (!(S >= 0 && S <= 1)) fail("sf outside [0, 1]", { x, sf: S });
    if (!(Math.abs(F + S - 1) <= 2 * e + ROUND)) fail("cdf + sf differs from 1 by more than twice the cdf bound", { x, cdf: F, sf: S, difference: F + S - 1 });
    if (i > 0 && !(F >= r.cdf[i - 1] - 2 * e - ROUND)) fail("cdf decreases by more than twice its bound", { from: xs[i - 1], to: x, cdfFrom: r.cdf[i - 1], cdfTo: F });
    if (i > 0 && !(S <= r.sf[i - 1] + 2 * e + ROUND)) fail("sf increases by more than twice its bound", { from: xs[i - 1], to: x, sfFrom: r.sf[i - 1], sfTo: S });
    if (r.pdf && !(r.pdf[i] >= -ep - ROUND)) fail("pdf below minus its bound", { x, pdf: r.pdf[i] });
    if (r.pmf && !(r.pmf[i] >= -ep - ROUND)) fail("pmf below minus its bound", { x, pmf: r.pmf[i] });
  }

  const q = quantiles(c, LEVELS, { expectedShortfall: true });
  const d = q.diagnostics.quantileError;
  const esErr = q.diagnostics.expectedShortfallError;
  const es = q.expectedShortfall;
  const probe: number[] = [];
  const resolved: number[] = [];
  for (let i = 0; i < LEVELS.length; i++) {
    const x = q.x[i];
    if (!Number.isFinite(x) || !Number.isFinite(d[i]) || !(d[i] >= 0)) {
      if (Number.isFinite(x) && Number.isNaN(d[i])) fail("quantile error bound is NaN", { p: LEVELS[i], q: x });
      continue;
    }
    resolved.push(i);
    // q + d >= q_p, so F(q + d) >= p; x < q - d < q_p, so F(x) < p (the left limit: under an atom or a lattice point)
    const hair = ROUND * Math.max(Math.abs(x), c.scale);
    probe.push(x + d[i] + hair, x - d[i] - hair - stepBelow(c, x - d[i]));
  }
  if (probe.length) {
    const rq = density(c, { x: probe, cdfOnly: true });
    const eb = rq.diagnostics.error.cdf + ROUND;
    resolved.forEach((i, j) => {
      const up = rq.cdf[2 * j];
      const down = rq.cdf[2 * j + 1];
      const qd = { p: LEVELS[i], q: q.x[i], quantileError: d[i], quantileMethod: q.diagnostics.method, probeCdfBound: rq.diagnostics.error.cdf };
      if (!(up >= LEVELS[i] - eb)) fail("F(q + d) < p: the quantile is too low for its bound", { ...qd, at: probe[2 * j], cdf: up });
      if (!(down <= LEVELS[i] + eb)) fail("F(x) > p below q - d: the quantile is too high for its bound", { ...qd, at: probe[2 * j + 1], cdf: down });
    });
  }
  for (let j = 1; j < resolved.length; j++) {
    const [a, b] = [resolved[j - 1], resolved[j]];
    const slack = d[a] + d[b] + ROUND * Math.max(Math.abs(q.x[a]), Math.abs(q.x[b]), c.scale);
    if (!(q.x[b] >= q.x[a] - slack)) fail("quantiles decrease in p beyond their bounds", { p: [LEVELS[a], LEVELS[b]], q: [q.x[a], q.x[b]], errors: [d[a], d[b]] });
  }
  if (es && esErr) {
    for (const i of resolved) {
      if (!Number.isFinite(es[i]) || !Number.isFinite(esErr[i])) continue;
      const slack = d[i] + esErr[i] + ROUND * Math.max(Math.abs(es[i]), c.scale);
      if (!(es[i] >= q.x[i] - slack)) fail("expected shortfall below its quantile", { p: LEVELS[i], q: q.x[i], es: es[i], quantileError: d[i], esError: esErr[i] });
    }
    for (let j = 1; j < resolved.length; j++) {
      const [a, b] = [resolved[j - 1], resolved[j]];
      if (!Number.isFinite(es[a]) || !Number.isFinite(es[b]) || !Number.isFinite(esErr[a]) || !Number.isFinite(esErr[b])) continue;
      const slack = esErr[a] + esErr[b] + ROUND * Math.max(Math.abs(es[a]), Math.abs(es[b]), c.scale);
      if (!(es[b] >= es[a] - slack)) fail("expected shortfall decreases in p beyond its bounds", { p: [LEVELS[a], LEVELS[b]], es: [es[a], es[b]], errors: [esErr[a], esErr[b]] });
    }
  }
}

export type MomentOutcome = "checked" | "heavy" | "not-applicable";

/**
 * Exact raw moments E X^k (k = 1, 2) against the numerical moments of the computed distribution, where E|X|^4
 * exists: E X^k = int_0^inf k x^(k-1) S_c(x) dx - int_-inf^0 k x^(k-1) F_c(x) dx + sum over atoms of x^k p, with
 * F_c, S_c the continuous part (the cdf minus the atoms' steps; the density integrated by parts, which keeps the
 * integrand continuous), by the trapezoid rule on 2^12 + 1 points over mean +- 40 sd (clipped to the support).
 * Allowance: the cdf bound times int |k x^(k-1)|, the quadrature error (twice the difference of the rule on h and
 * 2h), the mass beyond the grid by Cauchy-Schwarz (E[|X|^k; X outside] <= sqrt(E X^(2k) P(X outside))), and
 * rounding. Lattice laws: the pmf summed over the lattice, allowance the pmf bound times sum |x|^k plus the tail.
 */
export function checkMoments(model: Model): MomentOutcome {
  const c = compile(model);
  if (!(c.momentIndex > 4)) return "not-applicable";
  const mom = moments(c, 4);
  const raw = mom.raw;
  // the exact moments' own derived error bounds (running error analysis, lib/cf/moment-error.ts)
  const rawErr = mom.rawError;
  if (raw.some((v) => v === null || !Number.isFinite(v))) return "not-applicable";
  const [m1, m2, , m4] = raw as number[];
  const kind = c.kind.type;
  if (kind === "discrete") return "not-applicable";
  const sd = Math.sqrt(Math.max(m2 - m1 * m1, 0));
  if (!(sd > 0)) return "not-applicable";
  const exact = [m1, m2];
  const second = [m2, m4]; // E X^(2k)
  const fail = (what: string, d: Record<string, unknown>) => {
    throw new InvariantViolation(what, model, d);
  };
  let a = Math.max(c.support[0], m1 - 40 * sd);
  let b = Math.min(c.support[1], m1 + 40 * sd);
  if (kind === "lattice") {
    const { origin, step } = c.kind as { origin: number; step: number };
    const k0 = Math.ceil((a - origin) / step - 1e-9);
    const k1 = Math.floor((b - origin) / step + 1e-9);
    const count = k1 - k0 + 1;
    if (count > 1 << 18) return "not-applicable";
    a = origin + k0 * step;
    b = origin + k1 * step;
    const r = density(c, count === 1 ? { x: [a] } : { grid: { from: a, to: b, count } });
    const pmf = r.pmf!;
    const ep = r.diagnostics.error.pdf;
    const outside = Math.max(r.cdf[0] - pmf[0], 0) + Math.max(r.sf[count - 1], 0) + 2 * r.diagnostics.error.cdf;
    for (let k = 1; k <= 2; k++) {
      // compensated (Neumaier) summation: its error is at most 2u sum |terms| + O(n u^2) (Higham, Accuracy and
      // Stability of Numerical Algorithms, 2nd ed., eq. (4.12)); each term x^k p carries at most 3 ulp of its own
      let s = 0;
      let comp = 0;
      let abs = 0;
      let absTerms = 0;
      for (let i = 0; i < count; i++) {
        const x = a + i * step;
        const term = x ** k * pmf[i];
        const t = s + term;
        comp += Math.abs(s) >= Math.abs(term) ? s - t + term : term - t + s;
        s = t;
        abs += Math.abs(x) ** k;
        absTerms += Math.abs(term);
      }
      s += comp;
      // plus x = a + i step itself rounded once (relative u), which moves x^k by k u relative
      const rounding = ((2 + k) * 2 ** -53 + 3 * 2 ** -52 + count * 2 ** -104) * absTerms * 1.01;
      const tail = Math.sqrt(second[k - 1] * outside);
      if (tail > 1e-4 * Math.max(Math.abs(exact[k - 1]), sd ** k)) return "heavy";
      // the moment's derived bound; laws the engine derives none for (per-claim layers) keep the former 1e-12 relative
      const momentBound = rawErr[k - 1] ?? 1e-12 * Math.max(Math.abs(exact[k - 1]), sd ** k);
      const allow = ep * abs + tail + momentBound + rounding;
      if (!(Math.abs(s - exact[k - 1]) <= allow))
        fail(`raw moment ${k} differs from the numerical moment of the computed pmf`, { exact: exact[k - 1], numerical: s, difference: s - exact[k - 1], allowance: allow, pmfBound: ep, tail, momentBound, rounding, range: [a, b] });
    }
    return "checked";
  }
  const n = 4097;
  const atoms = listedAtoms(c);
  const r = density(c, { grid: { from: a, to: b, count: n }, cdfOnly: true });
  const e = r.diagnostics.error.cdf;
  const h = (b - a) / (n - 1);
  // the continuous part's cdf and sf (the atoms' x^k p is added exactly)
  const Fc = new Float64Array(n);
  const Sc = new Float64Array(n);
  let atomMass = 0;
  for (const t of atoms) atomMass += t.p;
  for (let i = 0; i < n; i++) {
    const x = a + i * h;
    let below = 0;
    for (const t of atoms) if (t.x <= x) below += t.p;
    Fc[i] = r.cdf[i] - below;
    Sc[i] = r.sf[i] - (atomMass - below);
  }
  const outsideRight = b < c.support[1] ? Math.max(r.sf[n - 1], 0) + e : 0;
  const outsideLeft = a > c.support[0] ? Math.max(r.cdf[0], 0) + e : 0;
  for (let k = 1; k <= 2; k++) {
    const g = (x: number) => k * x ** (k - 1);
    const t1 = byParts(g, a, h, 1, Fc, Sc);
    const t2 = byParts(g, a, h, 2, Fc, Sc);
    let numerical = t1;
    // int_0^a g S_c for a > 0 (S_c constant below the grid up to the tail) and -int_b^0 g F_c for b < 0
    if (a > 0) numerical += a ** k * Sc[0];
    if (b < 0) numerical += b ** k * Fc[n - 1];
    for (const t of atoms) numerical += t.x ** k * t.p;
    const tail = Math.sqrt(second[k - 1] * outsideRight) + Math.sqrt(second[k - 1] * outsideLeft);
    if (tail > 1e-4 * Math.max(Math.abs(exact[k - 1]), sd ** k)) return "heavy";
    const absG = Math.abs(b) ** k + (a < 0 ? Math.abs(a) ** k : 0);
    const allow = e * absG + 2 * Math.abs(t1 - t2) + tail + 1e-12 * Math.max(Math.abs(exact[k - 1]), sd ** k);
    if (!(Math.abs(numerical - exact[k - 1]) <= allow))
      fail(`raw moment ${k} differs from the numerical moment of the computed cdf`, {
        exact: exact[k - 1],
        numerical,
        difference: numerical - exact[k - 1],
        allowance: allow,
        quadrature: Math.abs(t1 - t2),
        tail,
        cdfBound: e,
        range: [a, b],
        atoms: atoms.length,
      });
  }
  return "checked";
}

/**
 * int over the grid of g(x) S_c(x) for x > 0 and of -g(x) F_c(x) for x < 0 by the trapezoid rule on every
 * `stride`-th node, with x = 0 as an extra node (F_c and S_c interpolated linearly there) so that the switch from
 * -F_c to S_c never falls inside a cell.
 */
function byParts(g: (x: number) => number, a: number, h: number, stride: number, Fc: Float64Array, Sc: Float64Array): number {
  const n = Fc.length;
  const xs: number[] = [];
  const left: number[] = [];
  const right: number[] = [];
  for (let i = 0; i < n; i += stride) {
    const x = a + i * h;
    if (xs.length && xs[xs.length - 1] < 0 && x > 0) {
      const j = i - stride;
      const u = (0 - xs[xs.length - 1]) / (x - xs[xs.length - 1]);
      xs.push(0);
      left.push(Fc[j] + u * (Fc[i] - Fc[j]));
      right.push(Sc[j] + u * (Sc[i] - Sc[j]));
    }
    xs.push(x);
    left.push(Fc[i]);
    right.push(Sc[i]);
  }
  let s = 0;
  for (let i = 1; i < xs.length; i++) {
    const [x0, x1] = [xs[i - 1], xs[i]];
    if (x1 <= 0) s -= 0.5 * (x1 - x0) * (g(x0) * left[i - 1] + g(x1) * left[i]);
    else s += 0.5 * (x1 - x0) * (g(x0) * right[i - 1] + g(x1) * right[i]);
  }
  return s;
}

export const deadlineHit = isDeadlineExceeded;
