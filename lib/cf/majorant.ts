import type { Node } from "./node";

/**
 * Non-increasing majorants of |phi| on the half-line: log M(t) into `out` with M(t) >= sup_{s >= t} |phi(s)|
 * (t >= 0). The inversion's truncation bound integrates the envelope of |phi| beyond the cut-off; sampling |phi|
 * at a few frequencies per octave misses the peaks of an almost periodic CF (a lattice term in a sum has
 * |phi(2 pi k / step)| = 1), so where a model's tree gives one, the envelope is this function instead.
 */
export type LogMajorant = ((t: Float64Array, out: Float64Array) => void) & {
  /**
   * Beyond t: M(s) <= exp(log) (t / s)^q for all s >= t (log >= log M(t)); the inversion's tail past its last probe is
   * the integral of this power (q = 0 where nothing is derived: that tail is then infinite unless M(t) = 0).
   */
  tail?: (t: number) => { log: number; q: number };
  /** a non-increasing majorant of |d/dt (phi(t) e^{-i t center})| on t >= 0 (plain values), where derived */
  slope?: Slope;
};

/** Non-increasing majorant of the recentred CF's derivative: |d/dt (phi(t) e^{-i t center})| <= at(t) (values, not logs). */
export interface Slope {
  center: number;
  at: (t: Float64Array, out: Float64Array) => void;
}

/** Attach the tail power and slope to a majorant function. */
export function majorant(
  fn: (t: Float64Array, out: Float64Array) => void,
  tail?: (t: number) => { log: number; q: number },
  slope?: Slope,
): LogMajorant {
  return Object.assign(fn, tail ? { tail } : {}, slope ? { slope } : {});
}


/**
 * Families whose |phi(t)| is itself non-increasing in |t| (closed forms): normal exp(-s^2 t^2 / 2); cauchy and stable
 * exp(-|g t|^a); gamma, exponential and chi-squared (1 + t^2 / r^2)^(-k/2); laplace 1 / (1 + b^2 t^2); logistic
 * (pi s t) / sinh(pi s t); student t a scale mixture of normals, E exp(-t^2 V / 2); variance gamma
 * |1 - i th nu t + s^2 nu t^2 / 2|^(-1/nu); nig exp(-d (Re sqrt(a^2 - (b + i t)^2) - sqrt(a^2 - b^2))), whose real
 * part grows with t (Johnson, Kotz & Balakrishnan vol. 1 and 2, the CFs in each family's chapter).
 */
export const MONOTONE_ABS_CF = new Set(["normal", "cauchy", "stable", "gamma", "exponential", "chi_squared", "laplace", "logistic", "student_t", "variance_gamma", "nig"]);

const EPS = Number.EPSILON;

/** The node's own |phi| (for the families above); q(t) its decay power on [t, inf) where derived, slope where derived. */
export function selfMajorant(node: Node, q?: (t: number) => number, slope?: Slope): LogMajorant {
  const fn = (t: Float64Array, out: Float64Array) => {
    const im = new Float64Array(t.length);
    const at = new Float64Array(t.length);
    for (let i = 0; i < t.length; i++) at[i] = Math.abs(t[i]);
    node.logCf(at, out, im);
    // the log-CF's real part carries a relative rounding of a few eps
    for (let i = 0; i < t.length; i++) out[i] = out[i] * (1 - 4 * EPS) + 4 * EPS;
  };
  return majorant(fn, (t) => ({ log: logAt(fn, t), q: q ? q(t) : 0 }), slope);
}

function logAt(fn: (t: Float64Array, out: Float64Array) => void, t: number): number {
  const o = new Float64Array(1);
  fn(Float64Array.of(t), o);
  return o[0];
}

/**
 * Uniform on [a, b]: |phi(t)| = |sin(u)| / u <= min(1, 1 / u), u = w t / 2, w = b - a; about the midpoint the derivative
 * is (w / 2) (u cos u - sin u) / u^2, at most (w / 2) min(1/2, (1 + u) / u^2) (|d sinc / du| < 0.44 everywhere).
 */
export function uniformMajorant(a: number, b: number): LogMajorant {
  const width = b - a;
  const fn = (t: Float64Array, out: Float64Array) => {
    for (let i = 0; i < t.length; i++) out[i] = Math.min(0, Math.log((2 / (width * Math.abs(t[i]))) * (1 + 4 * EPS)));
  };
  return majorant(
    fn,
    (t) => ({ log: logAt(fn, t), q: width * t >= 2 ? 1 : 0 }),
    {
      center: 0.5 * (a + b),
      at: (t, out) => {
        for (let i = 0; i < t.length; i++) {
          const u = 0.5 * width * Math.abs(t[i]);
          out[i] = 0.5 * width * Math.min(0.5, (1 + u) / (u * u)) * (1 + 8 * EPS);
        }
      },
    },
  );
}

/** Independent sum: |phi| = prod |phi_j|, each term without a majorant bounded by 1. */
export function sumMajorant(cs: Node[]): LogMajorant | undefined {
  const ms = cs.map((c) => c.logMajorant).filter((m): m is LogMajorant => !!m);
  if (ms.length === 0) return undefined;
  // bounding a continuous term's |phi| by 1 throws away its decay (a uniform + weibull + lognormal sum then needed the
  // full 2^22 terms and still missed its tolerance); where every term without a majorant is continuous, the sum's |phi|
  // has no almost-periodic peaks for the probes to miss, and the sampled envelope is kept. Terms that may not decay
  // (lattice, discrete, mixed laws) keep the product, with their factor bounded by 1.
  if (cs.every((c) => c.logMajorant || c.kind.type === "continuous") && ms.length < cs.length) return undefined;
  if (ms.length === 1 && ms.length === cs.length) return ms[0];
  const fn = (t: Float64Array, out: Float64Array) => {
    out.fill(0, 0, t.length);
    const tmp = new Float64Array(t.length);
    for (const m of ms) {
      m(t, tmp);
      for (let i = 0; i < t.length; i++) out[i] += tmp[i];
    }
  };
  const tail = ms.every((m) => m.tail)
    ? (t: number) => {
        let log = 0;
        let q = 0;
        for (const m of ms) {
          const r = m.tail!(t);
          log += r.log;
          q += r.q;
        }
        return { log, q };
      }
    : undefined;
  // (prod phi_j e^{-i t c_j})' = sum_j (phi_j e^{-i t c_j})' prod_{k != j} phi_k e^{-i t c_k}
  const slope: Slope | undefined =
    ms.length === cs.length && ms.every((m) => m.slope)
      ? {
          center: ms.reduce((s, m) => s + m.slope!.center, 0),
          at: (t, out) => {
            const n = t.length;
            const lm = ms.map(() => new Float64Array(n));
            const sl = ms.map(() => new Float64Array(n));
            ms.forEach((m, j) => {
              m(t, lm[j]);
              m.slope!.at(t, sl[j]);
            });
            for (let i = 0; i < n; i++) {
              let s = 0;
              for (let j = 0; j < ms.length; j++) {
                // the other factors' product (by their logs, without the term's own: it may be -inf)
                let other = 0;
                for (let k = 0; k < ms.length; k++) if (k !== j) other += lm[k][i];
                s += sl[j][i] * Math.exp(other);
              }
              out[i] = s * (1 + 8 * ms.length * EPS);
            }
          },
        }
      : undefined;
  return majorant(fn, tail, slope);
}

/** a X: M(|a| t); the slope |a| S(|a| t) about a c. */
export function scaleMajorant(a: number, c: Node): LogMajorant | undefined {
  return c.logMajorant ? scaledMajorant(a, c.logMajorant) : undefined;
}

/** the majorant of |phi(a t)| from one of |phi(t)| (a continuous part's too: scaling keeps its weight) */
export function scaledMajorant(a: number, m: LogMajorant): LogMajorant | undefined {
  if (!(a !== 0 && Number.isFinite(a))) return undefined;
  const aa = Math.abs(a);
  const fn = (t: Float64Array, out: Float64Array) => {
    const s = new Float64Array(t.length);
    for (let i = 0; i < t.length; i++) s[i] = aa * Math.abs(t[i]);
    m(s, out);
  };
  const sl = m.slope;
  return majorant(fn, m.tail ? (t) => m.tail!(aa * t) : undefined, sl
    ? {
        center: a * sl.center,
        at: (t, out) => {
          const s = new Float64Array(t.length);
          for (let i = 0; i < t.length; i++) s[i] = aa * Math.abs(t[i]);
          sl.at(s, out);
          for (let i = 0; i < t.length; i++) out[i] *= aa * (1 + 2 * EPS);
        },
      }
    : undefined);
}

/** X + b: the same |phi|, the slope's centre moved by b. */
export function shiftMajorant(b: number, c: Node): LogMajorant | undefined {
  return c.logMajorant ? shiftedMajorant(b, c.logMajorant) : undefined;
}

/** the majorant of the law moved by b from the law's own (a continuous part's too) */
export function shiftedMajorant(b: number, m: LogMajorant): LogMajorant {
  if (!m.slope || !Number.isFinite(b)) return m;
  const sl = m.slope;
  return majorant((t, out) => m(t, out), m.tail, { center: sl.center + b, at: sl.at });
}

/** Mixture: |phi| <= sum w_j |phi_j| (components without a majorant bounded by 1). */
export function mixMajorant(weights: number[], cs: Node[]): LogMajorant | undefined {
  if (!cs.some((c) => c.logMajorant)) return undefined;
  return weightedMajorant(weights, cs.map((c) => c.logMajorant));
}

/**
 * |phi_1| + |phi_2| + ...: a majorant of the size of a difference or sum of CFs (a sum's CF with its heaviest term's
 * taken out, ./invert/part.ts withTailLaw), from each one's majorant.
 */
export function sumMajorants(ms: LogMajorant[]): LogMajorant {
  return weightedMajorant(ms.map(() => 1), ms);
}

/** sum |w_j| M_j (an absent M_j counts as 1), with the tail powers and, where every M_j has one, the slopes */
function weightedMajorant(weights: number[], ms: (LogMajorant | undefined)[]): LogMajorant {
  const fn = (t: Float64Array, out: Float64Array) => {
    const acc = new Float64Array(t.length);
    const tmp = new Float64Array(t.length);
    ms.forEach((mj, j) => {
      const w = Math.abs(weights[j]);
      if (!mj) {
        for (let i = 0; i < t.length; i++) acc[i] += w;
        return;
      }
      mj(t, tmp);
      for (let i = 0; i < t.length; i++) acc[i] += w * Math.exp(tmp[i]);
    });
    for (let i = 0; i < t.length; i++) out[i] = Math.log(acc[i] * (1 + 4 * ms.length * EPS));
  };
  // sum w_j v_j (t/s)^{q_j} <= (sum w_j v_j) (t/s)^{min q_j}; a component without a majorant: v = 1, q = 0
  const tail = (t: number) => {
    let v = 0;
    let q = Infinity;
    ms.forEach((mj, j) => {
      const r = mj?.tail ? mj.tail(t) : { log: 0, q: 0 };
      v += Math.abs(weights[j]) * Math.exp(r.log);
      q = Math.min(q, r.q);
    });
    return { log: Math.log(v * (1 + 4 * ms.length * EPS)), q };
  };
  // about c = sum |w_j| c_j / sum |w_j|: (phi_j e^{-itc})' = (phi_j e^{-itc_j})' e^{-it(c - c_j)} - i (c - c_j) phi_j e^{-itc}
  const ws = weights.map(Math.abs);
  const W = ws.reduce((s, w) => s + w, 0);
  const slope: Slope | undefined = ms.every((mj) => mj?.slope)
    ? {
        center: ms.reduce((s, mj, j) => s + ws[j] * mj!.slope!.center, 0) / W,
        at: (t, out) => {
          const n = t.length;
          const center = ms.reduce((s, mj, j) => s + ws[j] * mj!.slope!.center, 0) / W;
          const lm = new Float64Array(n);
          const sl = new Float64Array(n);
          out.fill(0, 0, n);
          ms.forEach((mj, j) => {
            const m = mj!;
            m(t, lm);
            m.slope!.at(t, sl);
            const d = Math.abs(m.slope!.center - center) * (1 + 4 * EPS) + 4 * EPS * Math.abs(center);
            for (let i = 0; i < n; i++) out[i] += ws[j] * (sl[i] + d * Math.exp(lm[i]));
          });
          for (let i = 0; i < n; i++) out[i] *= 1 + 8 * ms.length * EPS;
        },
      }
    : undefined;
  return majorant(fn, tail, slope);
}

/** n-fold sum: M^n; the slope n S M^{n-1} about n c. */
export function repeatMajorant(n: number, c: Node): LogMajorant | undefined {
  const m = c.logMajorant;
  if (!m) return undefined;
  const sl = m.slope;
  return majorant(
    (t, out) => {
      m(t, out);
      for (let i = 0; i < t.length; i++) out[i] *= n;
    },
    m.tail
      ? (t) => {
          const r = m.tail!(t);
          return { log: n * r.log, q: n * r.q };
        }
      : undefined,
    sl
      ? {
          center: n * sl.center,
          at: (t, out) => {
            const lm = new Float64Array(t.length);
            m(t, lm);
            sl.at(t, out);
            for (let i = 0; i < t.length; i++) out[i] *= n * Math.exp((n - 1) * lm[i]) * (1 + 8 * n * EPS);
          },
        }
      : undefined,
  );
}
