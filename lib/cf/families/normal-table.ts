/**
 * Standard normal cdf Phi(z) with a derived bound on its absolute error, fast (a table lookup and a short Horner sum)
 * for the hot loops that take many values (../lognormal-pair.ts). Centres z_k = -k h, h = 1/16, k = 0..640 (down to
 * -40, below which Phi < 2^-1074); about a centre
 *   Phi(z_k + t) = Phi(z_k) + phi(z_k) sum_{n>=0} D_n t^{n+1} / (n+1)!,  D_n = phi^(n)(z_k) / phi(z_k) = (-1)^n He_n(z_k)
 * (A&S 26.2.4, 22.7.15: D_{n+1} = -z D_n - n D_{n-1}). The coefficients are formed exactly in integers (16^n D_n) and
 * rounded three times. The rest after N terms is phi^(N+1)(xi) t^{N+2} / (N+2)! with xi between z_k and z_k + t, at
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

/** a_0 .. a_N for centre -k h, each within 3.01 u of itself (numerator, denominator, quotient) */
function coefficients(k: number, N: number): number[] {
  const out: number[] = [];
  const kb = BigInt(k);
  let e0 = 1n; // 16^n D_n: E_{n+1} = k E_n - 256 n E_{n-1}
  let e1 = kb;
  let fact = 1n;
  for (let n = 0; n <= N; n++) {
    const en = n === 0 ? e0 : e1;
    fact *= BigInt(n + 1);
    // 16^n (n+1)! rounded once (the power of 2 scales exactly)
    out.push(Number(en) / (Number(fact) * 16 ** n));
    if (n >= 1) {
      const next = kb * e1 - 256n * BigInt(n) * e0;
      e0 = e1;
      e1 = next;
    }
  }
  return out;
}

const RADII = [0.25, 0.5, 1, 2, 4];
/**
 * the fewest terms N whose rest at |t| about centre z (<= 0) is below target, and that rest: Cauchy's bound
 * M_r |t|^{N+2} / ((N+2) r^{N+1}), M_r = e^{r^2/2} phi(max(0, |z| - |t| - r)), the best of a few radii r
 */
function terms(z: number, t: number, target: number): { N: number; tail: number } {
  const cur = RADII.map((r) => {
    const m = Math.max(0, -z - t - r);
    return (Math.exp(0.5 * r * r - 0.5 * m * m) / SQ2PI) * r * (t / r) ** 4 / 4;
  });
  let N = 2;
  for (;;) {
    const tail = 1.01 * Math.min(...cur);
    if (tail <= target || N >= 80) return { N, tail };
    for (let j = 0; j < RADII.length; j++) cur[j] *= ((t / RADII[j]) * (N + 2)) / (N + 3);
    N++;
  }
}

function build(): Table {
  const Phi = new Float64Array(K + 1);
  const phi = new Float64Array(K + 1);
  const err = new Float64Array(K + 1);
  const off = new Int32Array(K + 2);
  for (let k = 0; k <= K; k++) phi[k] = Math.exp(-(k * k) / 512) / SQ2PI;
  // the chain from z_K = -40 upwards: Phi(z_{k-1}) = Phi(z_k) + phi(z_k) S_k(h)
  let P = 0;
  let e = TINY;
  Phi[K] = P;
  err[K] = e;
  for (let k = K; k >= 1; k--) {
    const z = -k * H;
    // a target relative to Phi near z (at least phi(z) |z| / (z^2 + 1), Gordon 1941)
    const { N, tail } = terms(z, H, 2 ** -62 * phi[k] * Math.min(1, Math.max(-z, 1) / (z * z + 1)));
    const a = coefficients(k, N);
    let s = 0;
    let A = 0;
    for (let n = N; n >= 0; n--) {
      s = s * H + a[n];
      A = A * H + Math.abs(a[n]);
    }
    s *= H;
    A *= H;
    const inc = phi[k] * s;
    P += inc;
    // the increment: phi's rounding, the coefficients', Horner's, the product's, the rest; the sum u
    e += 1.01 * (phi[k] * (A * (3.01 * U + 2 * (N + 2) * U) + PHI_REL * Math.abs(s) + tail) + U * Math.abs(inc) + U * P) + TINY;
    Phi[k - 1] = P;
    err[k - 1] = e;
  }
  // the cells' coefficients and bounds for |t| <= h/2
  const flat: number[] = [];
  for (let k = 0; k <= K; k++) {
    const z = -k * H;
    off[k] = flat.length;
    const { N, tail } = terms(z, H / 2, 2 ** -62 * phi[k] * Math.min(1, Math.max(-z, 1) / (z * z + 1)));
    const a = coefficients(k, N);
    let A = 0;
    for (let n = N; n >= 0; n--) A = A * (H / 2) + Math.abs(a[n]);
    A *= H / 2;
    flat.push(...a);
    // the table value's error; the sum's (coefficients, Horner, phi, the product); the rest; the final sum u
    err[k] = 1.01 * (err[k] + phi[k] * (A * (3.01 * U + (2 * N + 4) * U + PHI_REL) + tail) + U * (Phi[k] + phi[k] * A)) + TINY;
  }
  off[K + 1] = flat.length;
  return { Phi, phi, err, coef: Float64Array.from(flat), off };
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
