/**
 * Risk measures of a law, each with an error bound built from the inversion's own bounds: VaR and ES in either
 * tail, stop-loss E[(S - d)+], limited mean E[min(S, u)], layer mean E[min(max(S - d, 0), l)], exceedance P(S > x),
 * return levels (the x with P(S > x) = 1/T) and the probability outside [lsl, usl].
 *
 * Identities used (each exact for any law with the moments named):
 *  - E[(S - d)+] = E[S] - d + int_{-inf}^d F(y) dy (integration by parts; Loss Models, limited expected value);
 *  - E[(u - S)+] = int_{-inf}^u F(y) dy;   E[min(S, u)] = u - E[(u - S)+];
 *  - ES_p (upper) = q_p + E[(S - q_p)+]/(1 - p), ES_p (lower) = q_p - E[(q_p - S)+]/p (Acerbi & Tasche 2002);
 *  - E[(S - d)+] = E[(S - q)+] + int_d^q S(y) dy for any q, used with q the quantile at level F(d).
 * Lattice laws (tabulated or discretised) are summed on their table, whose cdf error bound eps gives
 * |int_a^u (F_table - F)| <= (u - a) eps; other laws use the engine's quantiles and expected shortfall.
 */
import type { CompiledModel, Model } from "./types";
import { compile, type CompileOptions } from "./compile";
import { CfError } from "./errors";
import { density } from "./invert/density";
import { quantiles } from "./invert/quantile";
import { solveLattice } from "./invert/lattice";
import type { CompoundBracket } from "./discretise";
import type { RiskMethod } from "./methods";

export type Tail = "upper" | "lower";

export interface RiskRequest {
  var?: { p: number[]; tail?: Tail };
  es?: { p: number[]; tail?: Tail };
  stopLoss?: number[];
  limitedMean?: number[];
  layerMean?: { deductible: number; limit: number }[];
  exceedance?: number[];
  returnPeriod?: number[];
  outside?: { lsl: number; usl: number };
}

export interface MeasureValues {
  value: (number | null)[];
  error: (number | null)[];
}

export interface RiskResult {
  var?: MeasureValues;
  es?: MeasureValues;
  stopLoss?: MeasureValues;
  limitedMean?: MeasureValues;
  layerMean?: MeasureValues;
  exceedance?: MeasureValues;
  returnPeriod?: MeasureValues;
  outside?: { value: number; ppm: number; error: number };
  notes: string[];
  diagnostics: { method: RiskMethod; cdfError: number };
}

const EPS = Number.EPSILON;

/** What the measures need from a law: F and S at points, quantiles, ES, and the integral of F from the left. */
interface Backend {
  method: RiskMethod;
  cdfError: number;
  /** F(x), S(x), P(X = x) with a common absolute error bound */
  at(xs: number[]): { F: number[]; S: number[]; atom: number[]; err: number };
  /** q_p, its error, and the upper-tail ES with its error */
  quant(ps: number[], es: boolean): { q: number[]; qErr: number[]; es: number[]; esErr: number[] };
  /** E[(u - X)+] with its error; null when it is not available on this route */
  leftIntegral(us: number[]): { value: number; error: number }[] | null;
  notes: string[];
}

function tableBackend(c: CompiledModel, origin: number, step: number): Backend | null {
  if (!Number.isFinite(c.support[0])) return null;
  const sol = solveLattice(c, origin, step, 1e-13);
  const t = sol.table;
  const n = t.p.length;
  const xs = new Float64Array(n);
  const cdf = new Float64Array(n);
  let s = 0;
  for (let i = 0; i < n; i++) {
    xs[i] = t.origin + i * t.step;
    s += t.p[i];
    cdf[i] = s;
  }
  // the table starts at or below the support's lower end when tabulated from the model; mass below the window
  // of an inverted table is within the cdf error
  const lo = Math.min(c.support[0], t.origin);
  const eps = sol.errorCdf;
  const idx = (x: number) => {
    // last i with xs[i] <= x (tolerant to rounding of lattice points)
    const r = Math.floor((x - t.origin) / t.step + 1e-9);
    return Math.min(r, n - 1);
  };
  const F = (x: number) => {
    const i = idx(x);
    return i < 0 ? 0 : Math.min(1, cdf[i]);
  };
  const be: Backend = {
    method: sol.method,
    cdfError: eps,
    notes: sol.notes,
    at(pts) {
      const Fs = pts.map(F);
      const atom = pts.map((x) => {
        const i = idx(x);
        return i >= 0 && Math.abs(xs[i] - x) <= 1e-9 * Math.max(Math.abs(x), t.step) ? t.p[i] : 0;
      });
      // S summed from the right keeps its relative accuracy in the upper tail
      const Ss = pts.map((x) => {
        const i = idx(x);
        let r = t.tailMass;
        for (let j = n - 1; j > i; j--) r += t.p[j];
        return Math.min(1, r);
      });
      return { F: Fs, S: Ss, atom, err: eps };
    },
    quant(ps, es) {
      const r = quantiles(c, ps, { expectedShortfall: es });
      // with |F_table - F| <= eps everywhere, the true quantile lies between the table's quantiles at p - eps and
      // p + eps (F(q) >= p implies F_table(q) >= p - eps; F_table(x) >= p + eps implies F(x) >= p)
      const tq = (level: number) => {
        if (level <= 0) return lo;
        if (level > cdf[n - 1]) return Infinity;
        let a = 0;
        let b = n - 1;
        while (a < b) {
          const m = (a + b) >> 1;
          if (cdf[m] >= level) b = m;
          else a = m + 1;
        }
        return xs[a];
      };
      const qErr = Array.from(r.x, (q, i) => Math.max(r.diagnostics.quantileError[i], q - tq(ps[i] - eps), tq(ps[i] + eps) - q));
      return {
        q: Array.from(r.x),
        qErr,
        es: r.expectedShortfall ? Array.from(r.expectedShortfall) : [],
        esErr: r.diagnostics.expectedShortfallError ? Array.from(r.diagnostics.expectedShortfallError) : [],
      };
    },
    leftIntegral(us) {
      return us.map((u) => {
        if (u <= lo) return { value: 0, error: 0 };
        let v = 0;
        let abs = 0;
        const top = idx(u);
        for (let i = 0; i <= top; i++) {
          const term = (u - xs[i]) * t.p[i];
          v += term;
          abs += Math.abs(term);
        }
        return { value: v, error: (u - lo) * eps + 4 * EPS * (abs + Math.abs(u) * (top + 1)) };
      });
    },
  };
  return be;
}

function inversionBackend(c: CompiledModel): Backend {
  let err = 0;
  const notes: string[] = [];
  return {
    method: "inversion",
    get cdfError() {
      return err;
    },
    notes,
    at(pts) {
      if (pts.length === 0) return { F: [], S: [], atom: [], err: 0 };
      const r = density(c, { x: Float64Array.from(pts), cdfOnly: true });
      err = Math.max(err, r.diagnostics.error.cdf);
      const atom = pts.map((x) => r.atoms.filter((a) => Math.abs(a.x - x) <= 1e-12 * Math.max(1, Math.abs(x))).reduce((s, a) => s + a.p, 0));
      const pm = r.pmf;
      return { F: Array.from(r.cdf), S: Array.from(r.sf), atom: pm ? Array.from(pm) : atom, err: r.diagnostics.error.cdf };
    },
    quant(ps, es) {
      if (ps.length === 0) return { q: [], qErr: [], es: [], esErr: [] };
      const r = quantiles(c, ps, { expectedShortfall: es });
      err = Math.max(err, r.diagnostics.cdfError);
      return {
        q: Array.from(r.x),
        qErr: Array.from(r.diagnostics.quantileError),
        es: r.expectedShortfall ? Array.from(r.expectedShortfall) : [],
        esErr: r.diagnostics.expectedShortfallError ? Array.from(r.diagnostics.expectedShortfallError) : [],
      };
    },
    leftIntegral: () => null,
  };
}

function backendOf(c: CompiledModel): Backend {
  const k = c.kind;
  if (k.type === "lattice") {
    const b = tableBackend(c, k.origin, k.step);
    if (b) return b;
  }
  return inversionBackend(c);
}

const meanOf = (c: CompiledModel): number | null => (c.tails.right > 1 || Number.isFinite(c.support[1])) && (c.tails.left > 1 || Number.isFinite(c.support[0])) ? c.cumulants(1)[0] : null;

/**
 * E[(X - d)+] for each d: on a table E[X] - d + int F; otherwise with q the quantile at level F(d) and the
 * engine's ES there, E[(X - q)+] = (1 - p)(ES_p - q), plus int_d^q S(y) dy = (q - d) s within |q - d| (2 err + atoms).
 */
function excess(c: CompiledModel, be: Backend, ds: number[]): { value: number; error: number }[] {
  const mean = meanOf(c);
  const left = be.leftIntegral(ds);
  if (left && mean !== null) {
    const m = c.cumulants(1)[0] as number;
    return ds.map((d, i) => ({ value: Math.max(0, m - d + left[i].value), error: left[i].error + 4 * EPS * (Math.abs(m) + Math.abs(d)) }));
  }
  if (!left) {
    const g = gridSide(c, ds, "upper");
    if (g) return g;
  }
  const out: { value: number; error: number }[] = new Array(ds.length);
  const inner: number[] = [];
  ds.forEach((d, i) => {
    if (d <= c.support[0] && mean !== null) out[i] = { value: mean - d, error: 4 * EPS * (Math.abs(mean) + Math.abs(d)) };
    else if (d >= c.support[1]) out[i] = { value: 0, error: 0 };
    else inner.push(i);
  });
  if (inner.length === 0) return out;
  const at = be.at(inner.map((i) => ds[i]));
  const levels = inner.map((_, j) => Math.min(1, Math.max(0, 1 - at.S[j])));
  const qr = be.quant(levels, true);
  inner.forEach((i, j) => {
    const d = ds[i];
    const s = at.S[j];
    const p = levels[j];
    if (p >= 1 || s <= 0) {
      // S(d) is within the cdf error of 0: E[(X - d)+] <= int_d^inf S, bounded by the mass beyond times the mean excess
      out[i] = { value: 0, error: Infinity };
      return;
    }
    const q = qr.q[j];
    const es = qr.es[j];
    const esErr = qr.esErr[j] ?? Infinity;
    const gap = Math.abs(q - d) + qr.qErr[j];
    const value = s * (es - d);
    const error = s * esErr + Math.abs(es - d) * at.err + gap * (2 * at.err + at.atom[j]) + 4 * EPS * Math.abs(value);
    out[i] = { value: Math.max(0, value), error: Number.isFinite(es) ? error : Infinity };
  });
  return out;
}

/**
 * E[(X - d)+] (side "upper") or E[(u - X)+] (side "lower") by integrating the inverted sf (or cdf) over a fine grid:
 * on each cell the monotone function lies between its end values, so |trapezoid - integral| <= h |G(a) - G(b)| / 2
 * summed (exact bracket, no smoothness assumed); plus (length) x (cdf error bound); plus the tail beyond the grid,
 * E[(X - R)+] <= E|X - mu|^k / (R - mu)^(k-1) for even k below the moment index (a Markov-type bound, common
 * practice), or nothing when the support ends on that side. Returns null when the side is unbounded and the variance
 * does not exist (the engine's shortfall route is used then).
 */
function gridSide(c: CompiledModel, pts: number[], side: "upper" | "lower"): { value: number; error: number }[] | null {
  const dir = side === "upper" ? 1 : -1;
  const end = side === "upper" ? c.support[1] : c.support[0];
  let R = end;
  let tail = 0;
  if (!Number.isFinite(end)) {
    if (!(c.momentIndex > 2)) return null;
    const kappa = c.cumulants(16);
    const mu = kappa[0];
    const sd = kappa[1] !== null ? Math.sqrt(Math.max(kappa[1], 0)) : null;
    if (mu === null || sd === null || !(sd > 0)) return null;
    // central moments of X from its cumulants (Kendall & Stuart vol. 1, ch. 3)
    const k0 = kappa.slice();
    k0[0] = 0;
    const m: number[] = [1];
    for (let j = 1; j <= 16; j++) {
      let acc = 0;
      let cc = 1;
      let ok = true;
      for (let k = 1; k <= j; k++) {
        const kk = k0[k - 1];
        if (kk === null || !(j < c.momentIndex)) {
          ok = false;
          break;
        }
        acc += cc * kk * m[j - k];
        cc = (cc * (j - k)) / k;
      }
      m.push(ok ? acc : NaN);
    }
    const tailBound = (dist: number) => {
      let b = Infinity;
      for (let k = 2; k <= 16; k += 2) if (Number.isFinite(m[k]) && m[k] >= 0) b = Math.min(b, m[k] / dist ** (k - 1));
      return b;
    };
    // the far end: where the tail bound is negligible next to the cdf error
    let s = 20;
    while (s < 1e4 && tailBound(s * sd) > 1e-13 * sd) s *= 1.5;
    R = mu + dir * s * sd;
    tail = tailBound(s * sd);
  }
  const inner = pts.map((d) => (side === "upper" ? d < R : d > R));
  const active = pts.filter((_, i) => inner[i]);
  if (active.length === 0) return pts.map(() => ({ value: 0, error: tail }));
  const start = side === "upper" ? Math.min(...active) : Math.max(...active);
  const count = 1 << 15;
  const from = Math.min(start, R);
  const to = Math.max(start, R);
  const g = density(c, { grid: { from, to, count: count + 1 }, cdfOnly: true });
  const at = density(c, { x: Float64Array.from(active), cdfOnly: true });
  const errCdf = Math.max(g.diagnostics.error.cdf, at.diagnostics.error.cdf);
  const G = side === "upper" ? g.sf : g.cdf;
  const h = (to - from) / count;
  // cumulative trapezoid from the far end: T[i] = int over [x_i, R] (upper) or [L, x_i] (lower)
  const T = new Float64Array(count + 1);
  if (side === "upper") for (let i = count - 1; i >= 0; i--) T[i] = T[i + 1] + (h * (G[i] + G[i + 1])) / 2;
  else for (let i = 1; i <= count; i++) T[i] = T[i - 1] + (h * (G[i] + G[i - 1])) / 2;
  let j = 0;
  return pts.map((d, i) => {
    if (!inner[i]) return { value: 0, error: tail };
    const Gd = side === "upper" ? at.sf[j] : at.cdf[j];
    j++;
    // the grid point next to d towards R
    const idx = side === "upper" ? Math.min(count, Math.ceil((d - from) / h - 1e-12)) : Math.max(0, Math.floor((d - from) / h + 1e-12));
    const xg = from + idx * h;
    const Gg = G[idx];
    const part = (Math.abs(xg - d) * (Gd + Gg)) / 2;
    const value = T[idx] + part;
    const gR = side === "upper" ? G[count] : G[0];
    const bracket = (h * Math.abs(Gg - gR)) / 2 + (Math.abs(xg - d) * Math.abs(Gd - Gg)) / 2;
    const error = bracket + Math.abs(R - d) * errCdf + tail + 8 * EPS * (Math.abs(value) + Math.abs(R - d));
    return { value, error };
  });
}

const fin = (v: number | null | undefined): number | null => (v === null || v === undefined || !Number.isFinite(v) ? null : v);

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
function boundedMeasures(c: CompiledModel, B: CompoundBracket, req: RiskRequest, notes: string[]): RiskResult {
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
  // E[(S - d)+] between E[(S_D - d)+] and E[(S_U - d)+], each E[S] - d + int_0^d F
  const stopLoss = (d: number) => {
    if (!hasMean) return { value: null, error: null };
    const x = Math.max(d, 0);
    const lo = B.meanLow! - d + D.left(x) - x * e - rnd(B.meanLow! + Math.abs(d));
    const hi = B.meanHigh! - d + U.left(x) + x * e + rnd(B.meanHigh! + Math.abs(d));
    return mid(Math.max(0, lo), hi);
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
        return mid(x - D.left(x) - x * e - rnd(x), x - U.left(x) + x * e + rnd(x));
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

/** All requested measures of `model` (validated notation). Measures that do not exist come back null with a note. */
export function riskMeasures(model: Model, req: RiskRequest, options: CompileOptions = {}): RiskResult {
  const c = compile(model, options);
  const bounds = c.bounds?.();
  if (bounds) return boundedMeasures(c, bounds, req, []);
  const be = backendOf(c);
  const notes: string[] = [];
  let negC: CompiledModel | null = null;
  let negBe: Backend | null = null;
  const neg = () => {
    if (!negBe) {
      negC = compile({ scale: -1, of: model } as Model, options);
      negBe = backendOf(negC);
    }
    return { c: negC as unknown as CompiledModel, be: negBe };
  };
  const hasRightMean = c.tails.right > 1 || Number.isFinite(c.support[1]);
  const hasLeftMean = c.tails.left > 1 || Number.isFinite(c.support[0]);
  const out: RiskResult = { notes, diagnostics: { method: be.method, cdfError: 0 } };
  const mv = (vals: { value: number | null; error: number | null }[]): MeasureValues => ({
    value: vals.map((v) => fin(v.value)),
    error: vals.map((v) => (fin(v.value) === null ? null : v.error === null || !Number.isFinite(v.error) ? null : v.error)),
  });

  if (req.var) {
    const r = be.quant(req.var.p, false);
    out.var = mv(req.var.p.map((_, i) => ({ value: r.q[i], error: r.qErr[i] })));
  }
  if (req.es) {
    const tail = req.es.tail ?? "upper";
    if (tail === "upper") {
      if (!hasRightMean) {
        out.es = { value: req.es.p.map(() => null), error: req.es.p.map(() => null) };
        notes.push(`es: E[X | X >= q_p] is infinite: the right tail decays like x^-${c.tails.right}, so the mean of the upper tail does not exist.`);
      } else {
        const r = be.quant(req.es.p, true);
        out.es = mv(req.es.p.map((_, i) => ({ value: r.es[i], error: r.esErr[i] ?? null })));
      }
    } else if (!hasLeftMean) {
      out.es = { value: req.es.p.map(() => null), error: req.es.p.map(() => null) };
      notes.push(`es: E[X | X <= q_p] is infinite: the left tail decays like |x|^-${c.tails.left}, so the mean of the lower tail does not exist.`);
    } else {
      // lower tail: ES_p(X) = -ES_{1-p}(-X) (upper tail of the negated law)
      const n = neg();
      const r = n.be.quant(req.es.p.map((p) => 1 - p), true);
      out.es = mv(req.es.p.map((_, i) => ({ value: r.es[i] === undefined ? null : -r.es[i], error: r.esErr[i] ?? null })));
    }
  }
  const upperExcess = (ds: number[]) => (hasRightMean ? excess(c, be, ds) : null);
  const lowerExcess = (us: number[]) => {
    // E[(u - X)+] = E[(-X - (-u))+]
    if (!hasLeftMean) return null;
    const left = be.leftIntegral(us) ?? gridSide(c, us, "lower");
    if (left) return left;
    const n = neg();
    return excess(n.c, n.be, us.map((u) => -u));
  };
  if (req.stopLoss) {
    const r = upperExcess(req.stopLoss);
    if (!r) {
      out.stopLoss = { value: req.stopLoss.map(() => null), error: req.stopLoss.map(() => null) };
      notes.push(`stopLoss: E[(S - d)+] is infinite: the right tail decays like x^-${c.tails.right} (the mean does not exist).`);
    } else out.stopLoss = mv(r);
  }
  if (req.limitedMean) {
    const r = lowerExcess(req.limitedMean);
    if (!r) {
      out.limitedMean = { value: req.limitedMean.map(() => null), error: req.limitedMean.map(() => null) };
      notes.push(`limitedMean: E[min(S, u)] is minus infinity: the left tail decays like |x|^-${c.tails.left}.`);
    } else out.limitedMean = mv(req.limitedMean.map((u, i) => ({ value: u - r[i].value, error: r[i].error + 4 * EPS * Math.abs(u) })));
  }
  if (req.layerMean) {
    const L = req.layerMean;
    const ends = [...L.map((x) => x.deductible), ...L.map((x) => x.deductible + x.limit)];
    let r: { value: number; error: number }[] | null = null;
    if (hasRightMean) {
      const e = excess(c, be, ends);
      r = L.map((_, i) => ({ value: e[i].value - e[i + L.length].value, error: e[i].error + e[i + L.length].error }));
    } else if (hasLeftMean) {
      const e = lowerExcess(ends)!;
      // int_d^{d+l} S = l - (E[(d+l - X)+] - E[(d - X)+])
      r = L.map((x, i) => ({ value: x.limit - (e[i + L.length].value - e[i].value), error: e[i].error + e[i + L.length].error + 4 * EPS * x.limit }));
    }
    if (!r) {
      out.layerMean = { value: L.map(() => null), error: L.map(() => null) };
      notes.push("layerMean: neither tail of this law has a mean, and the layer mean is computed through one of them; not available.");
    } else out.layerMean = mv(r.map((x, i) => ({ value: Math.min(Math.max(x.value, 0), L[i].limit), error: x.error })));
  }
  if (req.exceedance) {
    const r = be.at(req.exceedance);
    out.exceedance = mv(req.exceedance.map((_, i) => ({ value: r.S[i], error: r.err })));
  }
  if (req.returnPeriod) {
    const r = be.quant(req.returnPeriod.map((T) => 1 - 1 / T), false);
    out.returnPeriod = mv(req.returnPeriod.map((_, i) => ({ value: r.q[i], error: r.qErr[i] })));
  }
  if (req.outside) {
    const { lsl, usl } = req.outside;
    if (!(usl > lsl)) throw new CfError("invalid_model", "/outside/usl", `outside.usl (${usl}) must be greater than outside.lsl (${lsl}).`);
    const r = be.at([lsl, usl]);
    // P(S < lsl) = F(lsl) - P(S = lsl)
    const v = Math.max(0, r.F[0] - r.atom[0]) + r.S[1];
    const e = 2 * r.err + 4 * EPS;
    out.outside = { value: v, ppm: v * 1e6, error: e };
  }
  out.diagnostics = { method: be.method, cdfError: be.cdfError };
  out.notes.push(...c.notes);
  return out;
}
