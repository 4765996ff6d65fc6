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
  const fb = toBounds(derivativeVariations(mu, sigma, 1, c, K), 1);
  const gb = toBounds(derivativeVariations(mu, sigma, 0, c, K), Math.exp(mu + 0.5 * sigma * sigma) * (1 + 16 * EPS));
  const pm = powerMajorant(fb, { center: 0, bounds: gb });
  if (BUILT.size > 256) BUILT.clear();
  BUILT.set(key, pm);
  return pm;
}
