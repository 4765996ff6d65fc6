/** Risk measures of a compound bracketed between two lattice laws (claims rounded down and up). */
import type { CompiledModel } from "./types";
import type { CompoundBracket } from "./discretise";
import { CfError } from "./errors";
import type { MeasureValues, RiskRequest, RiskResult } from "./risk";

const EPS = Number.EPSILON;

export const fin = (v: number | null | undefined): number | null => (v === null || v === undefined || !Number.isFinite(v) ? null : v);

/** One bounding lattice law: cdf, left integral int_0^u F and quantiles on its table. */
class BoundLaw {
  readonly F: Float64Array;
  /** sum over points <= x_k of x_k p_k */
  readonly G1: Float64Array;
  /** P(S > x_k) summed from the right */
  readonly T: Float64Array;
  constructor(
    readonly p: Float64Array,
    readonly h: number,
  ) {
    const n = p.length;
    this.F = new Float64Array(n);
    this.G1 = new Float64Array(n);
    this.T = new Float64Array(n);
    let f = 0;
    let g = 0;
    for (let k = 0; k < n; k++) {
      f += p[k];
      g += k * h * p[k];
      this.F[k] = f;
      this.G1[k] = g;
    }
    let t = Math.max(0, 1 - f);
    for (let k = n - 1; k >= 0; k--) {
      this.T[k] = t;
      t += p[k];
    }
  }
  /** index of the last lattice point <= x (-1 below the table) */
  idx(x: number): number {
    if (x < 0) return -1;
    let i = Math.min(this.p.length - 1, Math.floor(x / this.h));
    while (i + 1 < this.p.length && (i + 1) * this.h <= x) i++;
    while (i >= 0 && i * this.h > x) i--;
    return i;
  }
  cdf(x: number): number {
    const i = this.idx(x);
    return i < 0 ? 0 : this.F[i];
  }
  /** P(S < x) */
  cdfBelow(x: number): number {
    let i = this.idx(x);
    if (i >= 0 && i * this.h === x) i--;
    return i < 0 ? 0 : this.F[i];
  }
  sf(x: number): number {
    const i = this.idx(x);
    return i < 0 ? 1 : this.T[i];
  }
  /** int_0^u F(y) dy = E[(u - S)+] */
  left(u: number): number {
    const i = this.idx(u);
    return i < 0 ? 0 : u * this.F[i] - this.G1[i];
  }
  /** smallest lattice point with F >= level; Infinity when the table does not reach it */
  quantile(level: number): number {
    if (level <= 0) return 0;
    const F = this.F;
    if (!(F[F.length - 1] >= level)) return Infinity;
    let a = 0;
    let b = F.length - 1;
    while (a < b) {
      const m = (a + b) >> 1;
      if (F[m] >= level) b = m;
      else a = m + 1;
    }
    return a * this.h;
  }
}

/**
 * Every measure bracketed between the compounds with claims rounded down (D) and up (U): S_D <= S <= S_U in the usual
 * stochastic order, so each measure that is monotone in that order (cdf, sf, quantiles, stop-loss, limited and layer
 * means, ES in either tail) lies between its values for D and U. Each computed table's cdf is within `slack` of its law's
 * cdf at every point, which widens each end: by slack for probabilities, by slack times the integration length for
 * integrals of F. The answer is the middle of the bracket and its error half the bracket's width (Kaas, Goovaerts,
 * Dhaene & Denuit, Modern Actuarial Risk Theory, ordering of risks; ES as min_q q + E[(S - q)+]/(1 - p), Rockafellar &
 * Uryasev 2002).
 */
export function boundedMeasures(c: CompiledModel, B: CompoundBracket, req: RiskRequest, notes: string[]): RiskResult {
  const D = new BoundLaw(B.down, B.step);
  const U = new BoundLaw(B.up, B.step);
  const e = B.slack;
  const rnd = (x: number) => 8 * EPS * (Math.abs(x) + 1) * Math.sqrt(B.down.length);
  const mid = (lo: number, hi: number): { value: number | null; error: number | null } =>
    Number.isFinite(lo) && Number.isFinite(hi) && hi >= lo ? { value: (lo + hi) / 2, error: (hi - lo) / 2 } : { value: null, error: null };
  const mv = (vals: { value: number | null; error: number | null }[]): MeasureValues => ({
    value: vals.map((v) => fin(v.value)),
    error: vals.map((v) => (fin(v.value) === null ? null : fin(v.error))),
  });
  const out: RiskResult = { notes, diagnostics: { method: "discretised-bounds", cdfError: 0 } };
  let half = 0;
  for (let k = 0; k < D.F.length; k++) half = Math.max(half, (D.F[k] - U.F[k]) / 2);
  out.diagnostics.cdfError = half + e;
  const quant = (p: number) => mid(D.quantile(p - e), U.quantile(p + e));
  const hasMean = B.meanLow !== null && B.meanHigh !== null && (c.tails.right > 1 || Number.isFinite(c.support[1]));
  // E[(S - d)+] between E[(S_D - d)+] and E[(S_U - d)+], each E[S] - d + int_0^d F; the integral's slack grows like
  // d e, so past the tables' last point x_end the upper end is taken at x_end instead (E[(S - d)+] falls with d)
  const xEnd = (Math.min(B.down.length, B.up.length) - 1) * B.step;
  const slBracket = (d: number) => {
    const x = Math.max(d, 0);
    const lo = B.meanLow! - d + D.left(x) - x * e - rnd(B.meanLow! + Math.abs(d));
    const hi = B.meanHigh! - d + U.left(x) + x * e + rnd(B.meanHigh! + Math.abs(d));
    return { lo: Math.max(0, lo), hi };
  };
  const slEnd = hasMean ? slBracket(xEnd).hi : Infinity;
  const slRange = (d: number) => {
    const r = slBracket(d);
    return d > xEnd ? { lo: r.lo, hi: Math.min(r.hi, slEnd) } : r;
  };
  const stopLoss = (d: number) => {
    if (!hasMean) return { value: null, error: null };
    const r = slRange(d);
    return mid(r.lo, r.hi);
  };
  if (req.var) out.var = mv(req.var.p.map(quant));
  if (req.returnPeriod) out.returnPeriod = mv(req.returnPeriod.map((T) => quant(1 - 1 / T)));
  if (req.es) {
    const tail = req.es.tail ?? "upper";
    if (tail === "upper" && !hasMean) {
      out.es = { value: req.es.p.map(() => null), error: req.es.p.map(() => null) };
      notes.push(`es: E[X | X >= q_p] is infinite: the right tail decays like x^-${c.tails.right}, so the mean of the upper tail does not exist.`);
    } else if (tail === "upper") {
      out.es = mv(
        req.es.p.map((p) => {
          // ES_D = min_q q + E[(S_D - q)+]/(1 - p) >= the minimum of its computed lower bound, reached at q_D(p + slack)
          const qd = D.quantile(p + e);
          const qu = U.quantile(p);
          if (!Number.isFinite(qd) || !Number.isFinite(qu)) return { value: null, error: null };
          const lo = qd + (B.meanLow! - qd + D.left(qd) - qd * e - rnd(B.meanLow!)) / (1 - p);
          // ES_U <= q + E[(S_U - q)+]/(1 - p) at any q
          const hi = qu + (B.meanHigh! - qu + U.left(qu) + qu * e + rnd(B.meanHigh!)) / (1 - p);
          return mid(lo, hi);
        }),
      );
    } else {
      out.es = mv(
        req.es.p.map((p) => {
          // lower tail: ES = max_q q - E[(q - S)+]/p
          const qd = D.quantile(p);
          const qu = U.quantile(p + e);
          if (!Number.isFinite(qd) || !Number.isFinite(qu)) return { value: null, error: null };
          const lo = qd - (D.left(qd) + qd * e + rnd(qd)) / p;
          const hi = qu - (U.left(qu) - qu * e - rnd(qu)) / p;
          return mid(lo, hi);
        }),
      );
    }
  }
  if (req.stopLoss) {
    out.stopLoss = mv(req.stopLoss.map(stopLoss));
    if (!hasMean) notes.push(`stopLoss: E[(S - d)+] is infinite: the right tail decays like x^-${c.tails.right} (the mean does not exist).`);
  }
  if (req.limitedMean)
    out.limitedMean = mv(
      req.limitedMean.map((u) => {
        const x = Math.max(u, 0);
        if (u <= 0) return { value: u, error: 0 };
        let lo = x - D.left(x) - x * e - rnd(x);
        let hi = x - U.left(x) + x * e + rnd(x);
        if (hasMean && u > xEnd) {
          // E[min(S, u)] = E[S] - E[(S - u)+], with E[(S - u)+] in [0, E[(S - x_end)+]]: a second bracket, intersected
          lo = Math.max(lo, B.meanLow! - slEnd - rnd(B.meanLow!));
          hi = Math.min(hi, B.meanHigh! + rnd(B.meanHigh!));
        }
        return mid(lo, hi);
      }),
    );
  if (req.layerMean)
    out.layerMean = mv(
      req.layerMean.map(({ deductible: d, limit: l }) => {
        const a = Math.max(d, 0);
        const b = Math.max(d + l, 0);
        const w = b - a;
        const lo = w - (D.left(b) - D.left(a)) - w * e - rnd(b);
        const hi = w - (U.left(b) - U.left(a)) + w * e + rnd(b);
        return mid(Math.max(0, lo), Math.min(l, hi));
      }),
    );
  if (req.exceedance) out.exceedance = mv(req.exceedance.map((x) => mid(Math.max(0, D.sf(x) - e), Math.min(1, U.sf(x) + e))));
  if (req.outside) {
    const { lsl, usl } = req.outside;
    if (!(usl > lsl)) throw new CfError("invalid_model", "/outside/usl", `outside.usl (${usl}) must be greater than outside.lsl (${lsl}).`);
    // P(S < lsl) + P(S > usl): the first between U's and D's P(S < lsl), the second between D's and U's sf
    const lo = Math.max(0, U.cdfBelow(lsl) - e) + Math.max(0, D.sf(usl) - e);
    const hi = Math.min(1, D.cdfBelow(lsl) + e) + Math.min(1, U.sf(usl) + e);
    const r = mid(lo, hi);
    out.outside = { value: r.value!, ppm: r.value! * 1e6, error: r.error! };
  }
  out.notes.push(...c.notes);
  return out;
}
