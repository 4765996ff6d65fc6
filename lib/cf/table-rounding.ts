import type { LatticeTable } from "./types";

/**
 * Rounding bounds of tabulated pmfs as tables are combined: `pmf` bounds every entry's absolute error, `l1` their sum
 * (so every cdf or sf value's), against the exact table the same arithmetic describes (the dropped tail and a
 * discretisation's own error are counted apart, tailMass and cdfError). u = eps/2.
 */
export interface TableRound {
  pmf: number;
  l1: number;
}

const U = Number.EPSILON / 2;
const gamma = (n: number) => (n * U) / (1 - n * U);

/**
 * A table's rounding bound where one is known: its own (round), or from a recursion's per-point bounds (pointRel: each
 * p_k within pointRel(k) p_k), or a single point of mass 1 (exact); null otherwise.
 */
export function roundOf(t: LatticeTable): TableRound | null {
  if (t.round) return t.round;
  if (t.p.length === 1 && t.p[0] === 1) return { pmf: 0, l1: 0 };
  const rel = t.pointRel;
  if (!rel) return null;
  let pmf = 0;
  let l1 = 0;
  for (let k = 0; k < t.p.length; k++) {
    const e = rel(k) * Math.max(t.p[k], 0);
    if (e > pmf) pmf = e;
    l1 += e;
  }
  return { pmf, l1: l1 * (1 + t.p.length * Number.EPSILON) };
}

/**
 * A bound on each entry's absolute rounding error where one is known: the table's own (pointErr), or from a recursion's
 * per-point bounds (pointRel(k) p_k, rounded up), or zeros for a single point of mass 1 (exact); null otherwise.
 */
export function pointErrOf(t: LatticeTable): Float64Array | null {
  if (t.pointErr && t.pointErr.length === t.p.length) return t.pointErr;
  if (t.p.length === 1 && t.p[0] === 1) return new Float64Array(1);
  const rel = t.pointRel;
  if (!rel) return null;
  const e = new Float64Array(t.p.length);
  for (let k = 0; k < e.length; k++) e[k] = rel(k) * Math.max(t.p[k], 0) * (1 + 2 * U);
  return e;
}

/**
 * Per-entry bounds of c = a * b by direct sums (convolveDirect), from the inputs' per-entry bounds ea, eb: each c_k a sum
 * of at most m = min(la, lb) non-negative products within gamma_{m+1} of itself (Higham, Accuracy and Stability of
 * Numerical Algorithms, 2nd ed., sec. 3.1), and the inputs' errors |da * b + (a + da) * db| <= ea * b + (a + ea) * eb
 * entry by entry (direct sums of non-negative terms, rounded up past their own rounding); kept to `kept` entries.
 */
export function convolvedPointErr(a: Float64Array, b: Float64Array, ea: Float64Array, eb: Float64Array, c: Float64Array, kept: number): Float64Array {
  const la = a.length;
  const lb = b.length;
  const g = gamma(Math.min(la, lb) + 1);
  const g2 = gamma(2 * Math.min(la, lb) + 4);
  const out = new Float64Array(kept);
  for (let k = 0; k < kept; k++) {
    let s = 0;
    const i0 = Math.max(0, k - lb + 1);
    const i1 = Math.min(k, la - 1);
    for (let i = i0; i <= i1; i++) s += ea[i] * Math.abs(b[k - i]) + (Math.abs(a[i]) + ea[i]) * eb[k - i];
    // s: at most 2 m + 2 products and sums of non-negative terms, rounded up by gamma_{2m+4}; the computed products' sum
    // within gamma_{m+1} of itself, so the rounding within g |c_k| / (1 - g)
    out[k] = (s * (1 + g2) + g * Math.abs(c[k]) * (1 + 2 * g)) * (1 + 4 * U);
  }
  return out;
}

/** sum_k |x_k| and sqrt(sum_k x_k^2), each rounded up past its own rounding */
function norms(x: Float64Array): { n1: number; n2: number } {
  let s1 = 0;
  let s2 = 0;
  for (let k = 0; k < x.length; k++) {
    const a = Math.abs(x[k]);
    s1 += a;
    s2 += a * a;
  }
  const g = 1 + gamma(x.length + 2);
  return { n1: s1 * g, n2: Math.sqrt(s2 * g) * (1 + U) };
}

/**
 * The bound on c = a * b as computed (a, b non-negative, with their bounds ra, rb), kept to its first `kept` entries.
 * The exact inputs' norms are at most the computed ones plus their bounds. The input errors: ||da * b||_inf <=
 * ||da||_inf ||b||_1, ||da * b||_1 <= ||da||_1 ||b||_1 (and the product of the two errors).
 *  - direct (convolveDirect): each c_k a sum of at most m = min(la, lb) non-negative products, within gamma_{m+1} c_k;
 *  - FFT (convolveFft: z = a + i b, Z = F z, P_k = (Z_k^2 - conj(Z_{N-k})^2)/(4i), c = Re F^-1 P): with Higham's bound
 *    for each transform (Accuracy and Stability of Numerical Algorithms, 2nd ed., thm 24.2: ||dY||_2 <= L ||Y||_2,
 *    L = log2(N) eta / (1 - log2(N) eta), eta <= 16u for fft.js as in ./invert/lattice.ts), s = sqrt(||a||_2^2 + ||b||_2^2),
 *    S1 = ||a||_1 + ||b||_1 >= |Z_k|: ||dZ||_2 <= L sqrt(N) s; the products move by (|Z_k| + |W_k| + |dZ|) |dZ| / 4 each
 *    and round within sqrt(2) gamma_4 (|Z_k|^2 + |W_k|^2) / 4, so ||dP||_2 / sqrt(N) <= (S1 + L sqrt(N) s / 2) L s +
 *    0.71 gamma_4 (S1 + L sqrt(N) s) s (1 + L); the inverse adds L ||P||_2 / sqrt(N) = L ||c||_2 <= L ||a||_1 ||b||_2
 *    (Young): ||dc||_2 <= (1 + L) ||dP||_2 / sqrt(N) + L ||c||_2 + the same on dP, which bounds every entry, and
 *    sqrt(kept) times it their sum. Taking the real part and clipping at 0 (c >= 0) only lowers the error.
 */
export function convolvedRound(a: Float64Array, b: Float64Array, ra: TableRound, rb: TableRound, fft: boolean, N: number, c: Float64Array, kept: number): TableRound {
  const na = norms(a);
  const nb = norms(b);
  const a1 = na.n1 + ra.l1;
  const b1 = nb.n1 + rb.l1;
  let pmf: number;
  let l1: number;
  if (!fft) {
    const g = gamma(Math.min(a.length, b.length) + 1);
    let cmax = 0;
    let csum = 0;
    for (let k = 0; k < kept; k++) {
      cmax = Math.max(cmax, c[k]);
      csum += c[k];
    }
    // (the exact c within the bound of the computed one)
    pmf = g * cmax * (1 + 2 * g);
    l1 = g * csum * (1 + gamma(kept + 2)) * (1 + 2 * g);
  } else {
    const levels = Math.log2(N);
    const L = (levels * 16 * U) / (1 - levels * 16 * U);
    // the exact inputs' 2-norms are within their l1 bounds of the computed ones
    const a2 = na.n2 + ra.l1;
    const b2 = nb.n2 + rb.l1;
    const s = Math.sqrt(a2 * a2 + b2 * b2) * (1 + 2 * U);
    const S1 = a1 + b1;
    const dZ = L * Math.sqrt(N) * s;
    const dP = (S1 + dZ / 2) * L * s + 0.71 * gamma(4) * (S1 + dZ) * s * (1 + L);
    const c2 = Math.min(a1 * b2, b1 * a2);
    const dc = ((1 + L) * dP + L * (c2 + dP)) * (1 + 8 * U);
    pmf = dc;
    l1 = dc * Math.sqrt(kept) * (1 + 2 * U);
  }
  pmf += ra.pmf * b1 + a1 * rb.pmf + ra.l1 * rb.pmf;
  l1 += ra.l1 * b1 + a1 * rb.l1 + ra.l1 * rb.l1;
  return { pmf: pmf * (1 + 8 * U), l1: l1 * (1 + 8 * U) };
}
