import { majorant, type LogMajorant } from "./majorant";
import { powerMajorant, type PowerBounds } from "./power-majorant";

const EPS = Number.EPSILON;
const SQRT_2PI = Math.sqrt(2 * Math.PI);

/**
 * Total variations of the derivatives of h(x) = e^{-a u} p(z) e^{-z^2/2} (u = ln x, z = (u - mu) / sigma, p a polynomial):
 * d/dx = e^{-u} d/du turns (a, p) into (a + 1, (p' - (z + a sigma) p) / sigma). h^{(k)} vanishes at x = 0 and x = inf,
 * its polynomial p_k has k simple real zeros and p_{k+1} has k + 1, one between each two consecutive zeros of p_k and one
 * beyond each end (Rolle: h^{(k)} -> 0 at both ends), so h^{(k)} has k + 1 extrema of alternating sign and
 * TV(h^{(k)}) = 2 sum_j |h^{(k)}(extremum_j)|. The extrema are bracketed by sign changes of p_{k+1} and the brackets narrowed by regula falsi; at each
 * the value is bounded by the larger end of its bracket plus the bracket's width times the derivative's size at its ends
 * (the derivative is monotone across a simple zero in a bracket this small). Returns TV(h), TV(h'), ..., TV(h^{(K)}).
 */
export function derivativeVariations(mu: number, sigma: number, a0: number, c0: number, K: number): number[] {
  let a = a0;
  let p = [c0]; // coefficients in z, low order first
  const step = (q: number[], av: number) => {
    const r = new Array<number>(q.length + 1).fill(0);
    for (let i = 1; i < q.length; i++) r[i - 1] += (i * q[i]) / sigma;
    for (let i = 0; i < q.length; i++) {
      r[i + 1] -= q[i] / sigma;
      r[i] -= av * q[i];
    }
    return r;
  };
  const peval = (q: number[], z: number) => {
    let s = 0;
    for (let i = q.length - 1; i >= 0; i--) s = s * z + q[i];
    return s;
  };
  // |h| at z for the current (a, p): e^{-a (mu + sigma z) - z^2 / 2} |p(z)|
  const habs = (q: number[], av: number, z: number) => Math.exp(-av * (mu + sigma * z) - 0.5 * z * z) * Math.abs(peval(q, z));
  let zeros: number[] = [];
  const out: number[] = [];
  for (let k = 0; k <= K; k++) {
    const pn = step(p, a);
    // Cauchy's bound on the zeros of pn
    const lead = pn[pn.length - 1];
    let R = 1;
    for (let i = 0; i < pn.length - 1; i++) R = Math.max(R, 1 + Math.abs(pn[i] / lead));
    const ends = [-R, ...zeros, R];
    const next: number[] = [];
    let tv = 0;
    for (let j = 0; j + 1 < ends.length; j++) {
      let lo = ends[j];
      let hi = ends[j + 1];
      // regula falsi with the Illinois modification (the bracket shrinks from both sides; a few steps per zero)
      let flo = peval(pn, lo);
      let fhi = peval(pn, hi);
      let side = 0;
      for (let it = 0; it < 100 && hi - lo > 1e-10 * (1 + Math.abs(lo)); it++) {
        let m = (lo * fhi - hi * flo) / (fhi - flo);
        if (!(m > lo && m < hi)) m = 0.5 * (lo + hi);
        const fm = peval(pn, m);
        if (fm === 0) {
          lo = hi = m;
          break;
        }
        if (Math.sign(fm) === Math.sign(flo)) {
          lo = m;
          flo = fm;
          if (side === -1) fhi *= 0.5;
          side = -1;
        } else {
          hi = m;
          fhi = fm;
          if (side === 1) flo *= 0.5;
          side = 1;
        }
      }
      next.push(0.5 * (lo + hi));
      // dh/dz = sigma e^{u} h^{(k+1)}: its size at the bracket's ends
      const d = (z: number) => sigma * Math.exp(mu + sigma * z) * habs(pn, a + 1, z);
      const v = Math.max(habs(p, a, lo), habs(p, a, hi)) + (hi - lo) * (d(lo) + d(hi));
      tv += v;
    }
    out.push(2 * tv * (1 + 1e-12));
    zeros = next;
    p = pn;
    a = a + 1;
  }
  return out;
}

/**
 * Lognormal(mu, sigma): |phi(t)| <= TV(f^{(k)}) / t^{k+1} for k = 0..K (f = e^{-u} e^{-z^2/2} / (sigma sqrt(2 pi))), and
 * |phi'(t)| <= TV((x f)^{(k)}) / t^{k+1} (x f = e^{-z^2/2} / (sigma sqrt(2 pi))) besides E X = e^{mu + sigma^2 / 2}.
 */
export function lognormalMajorant(mu: number, sigma: number, K = 20): LogMajorant {
  // the variations cost ~K^3 bisection steps: computed on first use and kept per (mu, sigma)
  let pm: LogMajorant | null = null;
  const get = () => (pm ??= build(mu, sigma, K));
  return majorant(
    (t, out) => get()(t, out),
    (t) => get().tail!(t),
    { center: 0, at: (t, out) => get().slope!.at(t, out) },
  );
}

const BUILT = new Map<string, LogMajorant>();

function build(mu: number, sigma: number, K: number): LogMajorant {
  const key = `${mu},${sigma},${K}`;
  const hit = BUILT.get(key);
  if (hit) return hit;
  const c = 1 / (sigma * SQRT_2PI);
  const m = 1 + 1e-12;
  const toBounds = (tv: number[], first: number): PowerBounds =>
    [
      [first],
      ...tv.map((v, k) => {
        const b = new Array<number>(k + 2).fill(0);
        b[k + 1] = v * m;
        return b;
      }),
    ].filter((b) => b.every((x) => Number.isFinite(x)));
  const fb = toBounds(variations(mu, sigma, 1, K), 1);
  const gb = toBounds(variations(mu, sigma, 0, K), Math.exp(mu + 0.5 * sigma * sigma) * (1 + 16 * EPS));
  const pm = powerMajorant(fb, { center: 0, bounds: gb });
  if (BUILT.size > 256) BUILT.clear();
  BUILT.set(key, pm);
  return pm;
}

/**
 * Bounds on the lognormal's damped transform and its derivative, |E[e^{(it - beta) X}]| and |E[X e^{(it - beta) X}]|, at
 * t > 0 for a damping beta >= 0, of every order k: g = e^{-beta x} h (h = f or x f) and all its derivatives vanish at 0
 * and at infinity, so k integrations by parts give |int g e^{itx}| <= ||g^{(k)}||_1 / t^k (common practice; e.g.
 * Katznelson, An Introduction to Harmonic Analysis, ch. I), and by Leibniz's rule with |e^{-beta x}| <= 1,
 * ||g^{(k)}||_1 <= sum_j C(k, j) beta^{k - j} ||h^{(j)}||_1, ||h^{(0)}||_1 = int h (1, or E X) and ||h^{(j)}||_1 =
 * TV(h^{(j - 1)}) (derivativeVariations). The least over k = 0..K, each term rounded up.
 */
/** derivativeVariations kept per (mu, sigma, a0, K): the undamped majorant and the damped bounds share them */
const VARIATIONS = new Map<string, number[]>();
function variations(mu: number, sigma: number, a0: number, K: number): number[] {
  const key = `${mu},${sigma},${a0},${K}`;
  let v = VARIATIONS.get(key);
  if (!v) {
    v = derivativeVariations(mu, sigma, a0, 1 / (sigma * SQRT_2PI), K);
    if (VARIATIONS.size > 512) VARIATIONS.clear();
    VARIATIONS.set(key, v);
  }
  return v;
}

export function lognormalDampedBounds(
  mu: number,
  sigma: number,
  K = 20,
): { abs(beta: number, t: number): number; slope(beta: number, t: number): number; decay(beta: number, t0: number): { R: number; q: number } } {
  // n_j = ||h^{(j)}||_1: int h, then the variations TV(h^{(j - 1)}) (computed on first use)
  let norms: { f: number[]; g: number[] } | null = null;
  const get = () =>
    (norms ??= {
      f: [1, ...variations(mu, sigma, 1, K)],
      g: [Math.exp(mu + 0.5 * sigma * sigma) * (1 + 16 * EPS), ...variations(mu, sigma, 0, K)],
    });
  // per damping: each order's numerator N_k = sum_j C(k, j) beta^{k - j} n_j (a handful of dampings per model: the plan's
  // probes and the chosen one); the bound of order k at t is N_k / t^k
  // the last damping's pair first: a probe asks at one beta for each of its ~430 frequencies, and a string key per call
  // (the number's formatting) cost as much as the bounds themselves
  const memo = new Map<string, Float64Array>();
  const last: Record<"f" | "g", { beta: number; c: Float64Array }> = { f: { beta: NaN, c: new Float64Array(0) }, g: { beta: NaN, c: new Float64Array(0) } };
  const numerators = (which: "f" | "g", beta: number) => {
    const l = last[which];
    if (l.beta === beta) return l.c;
    const key = `${which}${beta}`;
    let c = memo.get(key);
    if (c) {
      l.beta = beta;
      l.c = c;
      return c;
    }
    const n = get()[which];
    const out: number[] = [];
    for (let k = 0; k < n.length; k++) {
      let sum = 0;
      let binom = 1; // C(k, j) from j = 0 up
      for (let j = 0; j <= k; j++) {
        if (j > 0) binom = (binom * (k - j + 1)) / j;
        sum += j === k ? n[j] : binom * Math.pow(beta, k - j) * n[j];
      }
      if (!Number.isFinite(sum)) break;
      out.push(sum);
    }
    c = Float64Array.from(out);
    if (memo.size > 64) memo.clear();
    memo.set(key, c);
    l.beta = beta;
    l.c = c;
    return c;
  };
  // each numerator within a few ulps per term (binomials exact below 2^53, the power and products a few roundings, the sum
  // of non-negative terms k + 1 more), the power of 1/t within k + 1 more: 8 K + 16 ulps covers them
  const least = (which: "f" | "g", beta: number, t: number) => {
    const N = numerators(which, beta);
    const u = 1 / t;
    let best = Infinity;
    let uk = 1;
    for (let k = 0; k < N.length; k++) {
      const v = N[k] * uk;
      if (v < best) best = v;
      uk *= u;
    }
    return best * (1 + (8 * K + 16) * EPS);
  };
  // the order least at t0 bounds every t >= t0 with its own power: abs(t) <= N_k / t^k = abs(t0) (t0 / t)^k
  const decay = (beta: number, t0: number) => {
    const N = numerators("f", beta);
    const u = 1 / t0;
    let best = Infinity;
    let q = 0;
    let uk = 1;
    for (let k = 0; k < N.length; k++) {
      const v = N[k] * uk;
      if (v < best) {
        best = v;
        q = k;
      }
      uk *= u;
    }
    return { R: best * (1 + (8 * K + 16) * EPS), q };
  };
  return { abs: (beta, t) => least("f", beta, t), slope: (beta, t) => least("g", beta, t), decay };
}
