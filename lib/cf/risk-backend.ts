/**
 * The routes the risk measures read a law through: a lattice table summed exactly, or the engine's inversion
 * (cdf at points, quantiles and expected shortfall); and E[(X - d)+] / E[(u - X)+] built on either (see risk.ts for
 * the identities used).
 */
import type { CompiledModel } from "./types";
import { density } from "./invert/density";
import { quantiles } from "./invert/quantile";
import { solveLattice } from "./invert/lattice";
import type { RiskMethod } from "./methods";

const EPS = Number.EPSILON;

/** What the measures need from a law: F and S at points, quantiles, ES, and the integral of F from the left. */
export interface Backend {
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
      const sum = (u: number) => {
        let v = 0;
        let abs = 0;
        const top = idx(u);
        for (let i = 0; i <= top; i++) {
          const term = (u - xs[i]) * t.p[i];
          v += term;
          abs += Math.abs(term);
        }
        return { value: v, error: (u - lo) * eps + 4 * EPS * (abs + Math.abs(u) * (top + 1)) };
      };
      // past the table's last point the sum's bound grows like (u - lo) eps; with the mean m there,
      // E[(u - X)+] = u - m + E[(X - u)+] and 0 <= E[(X - u)+] <= E[(X - x_end)+] = m - x_end + int_lo^x_end F
      const m = meanOf(c);
      const xEnd = xs[n - 1];
      let cap: number | null = null;
      return us.map((u) => {
        if (u <= lo) return { value: 0, error: 0 };
        const direct = sum(u);
        if (m === null || !(u > xEnd)) return direct;
        if (cap === null) {
          const e = sum(xEnd);
          cap = Math.max(0, m - xEnd + e.value) + e.error + 4 * EPS * (Math.abs(m) + Math.abs(xEnd));
        }
        const viaMean = { value: u - m + cap / 2, error: cap / 2 + 4 * EPS * (Math.abs(u) + Math.abs(m) + cap) };
        return viaMean.error < direct.error ? viaMean : direct;
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

export function backendOf(c: CompiledModel): Backend {
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
export function excess(c: CompiledModel, be: Backend, ds: number[]): { value: number; error: number }[] {
  const mean = meanOf(c);
  const left = be.leftIntegral(ds);
  if (left && mean !== null) {
    const m = c.cumulants(1)[0] as number;
    return ds.map((d, i) => ({ value: Math.max(0, m - d + left[i].value), error: left[i].error + 4 * EPS * (Math.abs(m) + Math.abs(d)) }));
  }
  // the grid exists where the support ends on the right or the variance does (gridSide); then S(d) < 1e-10 goes to it
  const grid = Number.isFinite(c.support[1]) || c.momentIndex > 2;
  const viaEs = shortfallExcess(c, be, ds, mean, left || !grid ? 0 : 1e-10);
  if (left) return viaEs;
  // the grid's bracket needs no smoothness but is coarse (h times the drop of S); the shortfall route carries the ES
  // bound: each point takes the smaller of the two bounds, both of which hold (the grid only where the shortfall's bound
  // is above 1e-8 of the value: it costs a 2^15-point cdf grid)
  const need = ds.flatMap((_, i) => (viaEs[i].error <= 1e-8 * (1 + Math.abs(viaEs[i].value)) ? [] : [i]));
  const g = need.length ? gridSide(c, need.map((i) => ds[i]), "upper") : null;
  if (g) need.forEach((i, j) => g[j].error < viaEs[i].error && (viaEs[i] = g[j]));
  return viaEs;
}

/** E[(X - d)+] = S(d) (ES_p - d) with p = F(d), the engine's quantile and expected shortfall there (see excess) */
export function shortfallExcess(c: CompiledModel, be: Backend, ds: number[], mean: number | null, minS = 0): { value: number; error: number }[] {
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
  // levels within minS of 1 are left to the caller's grid where it has one (a quantile and ES that far out cost seconds:
  // Poisson(3) x gamma(2, 1) at d = 100, 2.8 s against 0.14 s by the grid)
  const asked = levels.flatMap((p, j) => (at.S[j] >= minS && p < 1 ? [j] : []));
  const qa = be.quant(asked.map((j) => levels[j]), true);
  const qr = { q: [] as number[], qErr: [] as number[], es: [] as number[], esErr: [] as (number | undefined)[] };
  asked.forEach((j, k) => {
    qr.q[j] = qa.q[k];
    qr.qErr[j] = qa.qErr[k];
    qr.es[j] = qa.es[k];
    qr.esErr[j] = qa.esErr[k];
  });
  inner.forEach((i, j) => {
    const d = ds[i];
    const s = at.S[j];
    const p = levels[j];
    if (p >= 1 || s <= 0 || !(s >= minS)) {
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
 * The law's mean mu, its standard deviation and E[(X - mu - r)+] <= E|X - mu|^k / r^(k-1) (and the same for the lower
 * tail) for even k below the moment index, the central moments from the cumulants (a Markov-type bound, common practice);
 * `reach` is the distance from mu where that bound is negligible next to a cdf error (1e-13 sd). null without a variance.
 */
function farEnds(c: CompiledModel): { mu: number; reach: number; tailBound: (dist: number) => number } | null {
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
  let s = 20;
  while (s < 1e4 && tailBound(s * sd) > 1e-13 * sd) s *= 1.5;
  return { mu, reach: s * sd, tailBound };
}

/**
 * E[(X - d)+] (side "upper") or E[(u - X)+] (side "lower") by integrating the inverted sf (or cdf) over a fine grid:
 * on each cell the monotone function lies between its end values, so |trapezoid - integral| <= h |G(a) - G(b)| / 2
 * summed (exact bracket, no smoothness assumed); plus (length) x (cdf error bound); plus the tail beyond the grid,
 * E[(X - R)+] <= E|X - mu|^k / (R - mu)^(k-1) for even k below the moment index (a Markov-type bound, common
 * practice), or nothing when the support ends on that side. Points on the other side of the law's mass (past its
 * support, or past mu -/+ reach of farEnds) take the mean identity instead, so a far retention or policy limit does not
 * stretch the grid. Returns null when the side is unbounded and the variance does not exist (the engine's shortfall
 * route is used then).
 */
export function gridSide(c: CompiledModel, pts: number[], side: "upper" | "lower"): { value: number; error: number }[] | null {
  const dir = side === "upper" ? 1 : -1;
  const end = side === "upper" ? c.support[1] : c.support[0];
  const far = farEnds(c);
  let R = end;
  let tail = 0;
  if (!Number.isFinite(end)) {
    if (!far) return null;
    R = far.mu + dir * far.reach;
    tail = far.tailBound(far.reach);
  }
  // points on the other side of the law's mass: E[(X - d)+] = m - d + E[(d - X)+] (upper), E[(u - X)+] = u - m + E[(X - u)+]
  // (lower), the last term 0 past a finite support end, else within the Markov-type bound; no grid needed for them
  const m = meanOf(c);
  const otherEnd = side === "upper" ? c.support[0] : c.support[1];
  const beyond = (d: number): { value: number; error: number } | null => {
    if (m === null) return null;
    let t: number;
    if (side === "upper" ? d <= otherEnd : d >= otherEnd) t = 0;
    else if (far && -dir * (d - far.mu) >= far.reach) t = far.tailBound(Math.abs(d - far.mu));
    else return null;
    return { value: dir * (m - d) + t / 2, error: t / 2 + 4 * EPS * (Math.abs(m) + Math.abs(d) + t) };
  };
  const outside = pts.map(beyond);
  const inner = pts.map((d, i) => outside[i] === null && (side === "upper" ? d < R : d > R));
  const active = pts.filter((_, i) => inner[i]);
  if (active.length === 0) return pts.map((_, i) => outside[i] ?? { value: 0, error: tail });
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
    if (outside[i]) return outside[i]!;
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
