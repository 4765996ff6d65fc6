/**
 * Standard normal cdf Phi(z) with a derived bound on its absolute error, fast (a table lookup and a short Horner sum)
 * for the hot loops that take many values (../lognormal-pair.ts). Centres z_k = -k h, h = 1/16, k = 0..640 (down to
 * -40, below which Phi < 2^-1074); about a centre
 *   Phi(z_k + t) = Phi(z_k) + phi(z_k) sum_{n>=0} D_n t^{n+1} / (n+1)!,  D_n = phi^(n)(z_k) / phi(z_k) = (-1)^n He_n(z_k)
 * (A&S 26.2.4, 22.7.15: D_{n+1} = -z D_n - n D_{n-1}). The coefficients come from that recurrence in floating point
 * with a running bound on their error. The rest after N terms is phi^(N+1)(xi) t^{N+2} / (N+2)! with xi between z_k and z_k + t, at
 * most max_{|s - xi| = r} |phi(s)| |t|^{N+2} / ((N+2) r^{N+1}) by Cauchy's estimate, and |phi(a + i b)| = phi(a) e^{b^2/2}.
 * The table's Phi(z_k) come from a chain of such steps from Phi(-40) (below 2^-1074, taken as 0) upwards: every step
 * adds a positive increment, so the absolute errors only add up (no cancellation). Above 0, Phi(z) = 1 - Phi(-z).
 * Rounding: u = 2^-53 per operation, exp within one ulp (the project's standing assumption), Horner's sum within
 * gamma_{2N+2} of the sum of its terms' sizes (Higham, Accuracy and Stability of Numerical Algorithms, 2002, eq. 5.3),
 * each step's error to first order with a 1% margin. Each cell's bound is a constant worked out for |t| = h/2.
 */
import type { Bounded } from "./normal-bounded";

const U = Number.EPSILON / 2;
const H = 1 / 16;
const K = 640;
const SQ2PI = Math.sqrt(2 * Math.PI);
/** phi's value and its relative rounding (k^2/512 exact; exp 2u; SQ2PI within 2u; the division u) */
const PHI_REL = 5.05 * U;
const TINY = 8 * Number.MIN_VALUE;

interface Table {
  Phi: Float64Array;
  phi: Float64Array;
  err: Float64Array;
  /** coefficients a_n = D_n / (n+1)! of cell k at off[k] .. off[k+1] - 1 */
  coef: Float64Array;
  off: Int32Array;
}
let table: Table | null = null;

/**
 * a_0 .. a_N for centre -k h into a, and bounds on their errors into da: D_n by its recurrence in floating point
 * (D_{n+1} = (k/16) D_n - n D_{n-1}, k/16 exact) with a running bound on the error (each step carries the errors of
 * D_n and D_{n-1} times their factors, and u of the two products and the difference), divided by (n+1)! (exact up to
 * 22!, then within (n - 21) u by its own products) with one more rounding
 */
function coefficients(k: number, N: number, a: Float64Array, da: Float64Array) {
  const zk = k / 16;
  let d0 = 1;
  let d1 = zk;
  let e0 = 0;
  let e1 = 0;
  let fact = 1;
  for (let n = 0; n <= N; n++) {
    const dn = n === 0 ? d0 : d1;
    const en = n === 0 ? e0 : e1;
    fact *= n + 1;
    const fRel = n + 1 > 22 ? (n - 21) * U : 0;
    a[n] = dn / fact;
    da[n] = (1.01 * (en + Math.abs(dn) * (fRel + U))) / fact;
    if (n >= 1) {
      const P = zk * d1;
      const Q = n * d0;
      const next = P - Q;
      const eNext = zk * e1 + n * e0 + U * (Math.abs(P) + Math.abs(Q) + Math.abs(next));
      d0 = d1;
      e0 = e1;
      d1 = next;
      e1 = eNext;
    }
  }
}

const RADII = [0.25, 0.5, 1, 2, 4];
/**
 * the fewest terms N whose rest at |t| about centre z (<= 0) is below target, and that rest: Cauchy's bound
 * M_r |t|^{N+2} / ((N+2) r^{N+1}), M_r = e^{r^2/2} phi(max(0, |z| - |t| - r)), the best of a few radii r
 */
const CUR = new Float64Array(RADII.length);
function terms(z: number, t: number, target: number): { N: number; tail: number } {
  for (let j = 0; j < RADII.length; j++) {
    const r = RADII[j];
    const m = Math.max(0, -z - t - r);
    const q = t / r;
    CUR[j] = ((Math.exp(0.5 * r * r - 0.5 * m * m) / SQ2PI) * r * q * q * q * q) / 4;
  }
  let N = 2;
  for (;;) {
    let best = CUR[0];
    for (let j = 1; j < RADII.length; j++) if (CUR[j] < best) best = CUR[j];
    const tail = 1.01 * best;
    if (tail <= target || N >= 80) return { N, tail };
    for (let j = 0; j < RADII.length; j++) CUR[j] *= ((t / RADII[j]) * (N + 2)) / (N + 3);
    N++;
  }
}

/** t sum_{n<=N} a_n t^n, t sum |a_n| t^n and t sum da_n t^n into HS (a small function: the build's hot loop, compiled early) */
const HS = new Float64Array(3);
function horner(a: Float64Array, da: Float64Array, N: number, t: number) {
  let s = 0;
  let A = 0;
  let dA = 0;
  for (let n = N; n >= 0; n--) {
    s = s * t + a[n];
    A = A * t + Math.abs(a[n]);
    dA = dA * t + da[n];
  }
  HS[0] = s * t;
  HS[1] = A * t;
  HS[2] = dA * t;
}

function build(): Table {
  const Phi = new Float64Array(K + 1);
  const phi = new Float64Array(K + 1);
  const err = new Float64Array(K + 1);
  const off = new Int32Array(K + 2);
  const a = new Float64Array(81);
  const da = new Float64Array(81);
  for (let k = 0; k <= K; k++) phi[k] = Math.exp(-(k * k) / 512) / SQ2PI;
  // the chain from z_K = -40 upwards, Phi(z_{k-1}) = Phi(z_k) + phi(z_k) S_k(h), and the cells' coefficients for
  // |t| <= h/2 (a leading part of the chain step's)
  let P = 0;
  let e = TINY;
  Phi[K] = P;
  err[K] = e;
  const cells: { N: number; tail: number; A: number; dA: number; coef: Float64Array }[] = [];
  for (let k = K; k >= 0; k--) {
    const z = -k * H;
    // a target relative to Phi near z (at least phi(z) |z| / (z^2 + 1), Gordon 1941)
    const target = 2 ** -62 * phi[k] * Math.min(1, Math.max(-z, 1) / (z * z + 1));
    const step = terms(z, H, target);
    const cell = terms(z, H / 2, target);
    coefficients(k, Math.max(step.N, cell.N), a, da);
    horner(a, da, cell.N, H / 2);
    cells[k] = { N: cell.N, tail: cell.tail, A: HS[1], dA: HS[2], coef: a.slice(0, cell.N + 1) };
    if (k === 0) break;
    const N = step.N;
    horner(a, da, N, H);
    const sm = HS[0];
    const As = HS[1];
    const dAs = HS[2];
    const inc = phi[k] * sm;
    P += inc;
    // the increment: phi's rounding, the coefficients', Horner's, the product's, the rest; the sum u
    e += 1.01 * (phi[k] * (dAs + As * 2 * (N + 2) * U + PHI_REL * Math.abs(sm) + step.tail) + U * Math.abs(inc) + U * P) + TINY;
    Phi[k - 1] = P;
    err[k - 1] = e;
  }
  let total = 0;
  for (let k = 0; k <= K; k++) total += cells[k].N + 1;
  const coef = new Float64Array(total);
  let at = 0;
  for (let k = 0; k <= K; k++) {
    const c = cells[k];
    off[k] = at;
    coef.set(c.coef, at);
    at += c.N + 1;
    // the table value's error; the sum's (coefficients, Horner, phi, the product); the rest; the final sum u
    err[k] = 1.01 * (err[k] + phi[k] * (c.dA + c.A * ((2 * c.N + 4) * U + PHI_REL) + c.tail) + U * (Phi[k] + phi[k] * c.A)) + TINY;
  }
  off[K + 1] = at;
  return { Phi, phi, err, coef, off };
}

/** Phi(z) into `out` (reused) with a bound on its absolute error */
export function normalCdfFast(z: number, out: Bounded): Bounded {
  const t0 = table ?? (table = build());
  const neg = z <= 0;
  const x = neg ? z : -z;
  if (!(x >= -40)) {
    if (Number.isNaN(z)) {
      out.v = NaN;
      out.e = NaN;
      return out;
    }
    // Phi(-40) < phi(40) / 40 < 2^-1074 (Gordon 1941)
    out.v = neg ? 0 : 1;
    out.e = Number.MIN_VALUE;
    return out;
  }
  const k = Math.round(-x * 16);
  // t exact: z_k is a multiple of 1/16, hence of ulp(x), and |t| <= 1/32 <= |x| unless k = 0
  const t = x + k * H;
  const o0 = t0.off[k];
  let s = 0;
  for (let i = t0.off[k + 1] - 1; i >= o0; i--) s = s * t + t0.coef[i];
  const v = t0.Phi[k] + t0.phi[k] * (s * t);
  if (neg) {
    out.v = v;
    out.e = t0.err[k];
  } else {
    out.v = 1 - v;
    out.e = t0.err[k] + U;
  }
  return out;
}
