import { getFftPlan, nextPowerOfTwo } from "./fftplan";
import { CfError } from "./errors";
import { checkDeadline } from "./deadline";
import { MAX_LATTICE } from "./limits";
import type { LatticeTable } from "./types";
import { convolvedPointErr, convolvedRound, pointErrOf, roundOf, type TableRound } from "./table-rounding";
import { twoSumErr } from "./moment-error";

/** Relative tolerance for deciding that two steps (or an offset and a step) are commensurate. */
export const COMMENSURATE_TOL = 1e-12;
const MAX_DENOMINATOR = 10_000;
const MAX_NUMERATOR = 1e9;

/**
 * Largest g with h1 = a g and h2 = b g for integers a, b (a "real gcd"), found from the continued fraction of h1/h2;
 * 0 is neutral (a single point). Returns null when h1/h2 is not p/q with q <= 10^4, p <= 10^9 within 1e-12.
 */
export function commonStep(h1: number, h2: number): number | null {
  h1 = Math.abs(h1);
  h2 = Math.abs(h2);
  if (h1 === 0) return h2;
  if (h2 === 0) return h1;
  if (h1 < h2) [h1, h2] = [h2, h1];
  const r = h1 / h2;
  // convergents p/q of r
  let p0 = 0, q0 = 1, p1 = 1, q1 = 0;
  let x = r;
  for (let i = 0; i < 64; i++) {
    const a = Math.floor(x);
    const p2 = a * p1 + p0;
    const q2 = a * q1 + q0;
    if (q2 > MAX_DENOMINATOR || p2 > MAX_NUMERATOR) return null;
    if (Math.abs(p2 / q2 - r) <= COMMENSURATE_TOL * r) return h2 / q2;
    p0 = p1; q0 = q1; p1 = p2; q1 = q2;
    const frac = x - a;
    if (frac < 1e-15) return null;
    x = 1 / frac;
  }
  return null;
}

/** Whether x is (within tolerance) an integer multiple of step g. */
export function onLattice(x: number, g: number, scale = 1): boolean {
  if (g === 0) return Math.abs(x) <= COMMENSURATE_TOL * Math.max(1, scale);
  const k = Math.round(x / g);
  return Math.abs(x - k * g) <= COMMENSURATE_TOL * Math.max(Math.abs(x), g, scale);
}

/** Direct convolution c = a * b (length la + lb - 1), exact to rounding (each entry a sum of non-negative products). */
export function convolveDirect(a: Float64Array, b: Float64Array, out?: Float64Array): Float64Array {
  const la = a.length;
  const lb = b.length;
  const c = out ?? new Float64Array(la + lb - 1);
  c.fill(0, 0, la + lb - 1);
  for (let i = 0; i < la; i++) {
    const ai = a[i];
    if (ai === 0) continue;
    for (let j = 0; j < lb; j++) c[i + j] += ai * b[j];
  }
  return c;
}

/**
 * FFT convolution with zero padding to N >= la + lb - 1 (no wrap-around). Both real inputs go through one complex
 * transform (z = a + i b, A_k = (Z_k + conj Z_{N-k})/2, B_k = (Z_k - conj Z_{N-k})/(2i); Press et al., Numerical
 * Recipes, two real FFTs in one, recalled from memory); the product's inverse gives c. Rounding leaves |error| ~ eps log2 N max|c|; negative
 * round-off is clipped to 0.
 */
export function convolveFft(a: Float64Array, b: Float64Array, out?: Float64Array): Float64Array {
  const la = a.length;
  const lb = b.length;
  const lc = la + lb - 1;
  const N = nextPowerOfTwo(lc);
  const plan = getFftPlan(N);
  const z = plan.a;
  const Z = plan.b;
  z.fill(0);
  for (let i = 0; i < la; i++) z[2 * i] = a[i];
  for (let j = 0; j < lb; j++) z[2 * j + 1] = b[j];
  plan.forward(z, Z);
  for (let k = 0; k < N; k++) {
    const m = (N - k) % N;
    const xr = Z[2 * k];
    const xi = Z[2 * k + 1];
    const wr = Z[2 * m];
    const wi = -Z[2 * m + 1];
    // (Z_k^2 - W^2) / (4i)
    const ur = xr * xr - xi * xi - (wr * wr - wi * wi);
    const ui = 2 * xr * xi - 2 * wr * wi;
    z[2 * k] = ui / 4;
    z[2 * k + 1] = -ur / 4;
  }
  // the product spectrum is Hermitian only up to rounding; the real part of the inverse is the convolution
  plan.inverse(z, Z);
  const c = out ?? new Float64Array(lc);
  for (let i = 0; i < lc; i++) {
    const v = Z[2 * i];
    c[i] = v > 0 ? v : 0;
  }
  return c;
}

/** Convolution of two non-negative sequences, direct for small work and FFT otherwise. */
export function convolve(a: Float64Array, b: Float64Array, out?: Float64Array): Float64Array {
  const la = a.length;
  const lb = b.length;
  if (la === 0 || lb === 0) throw new CfError("invalid_model", "", "Cannot convolve an empty table.");
  if (!convolveByFft(la, lb)) return convolveDirect(a, b, out);
  return convolveFft(a, b, out);
}

/** whether convolve takes the FFT (else the direct sums) for inputs of these lengths */
function convolveByFft(la: number, lb: number): boolean {
  const N = nextPowerOfTwo(la + lb - 1);
  return !(Math.min(la, lb) <= 32 || la * lb <= 6 * N * Math.log2(N));
}

function sum(p: Float64Array): number {
  let s = 0;
  for (let k = 0; k < p.length; k++) s += p[k];
  return s;
}

function truncate(p: Float64Array, maxLength: number): Float64Array {
  return p.length > maxLength ? p.subarray(0, maxLength) : p;
}

/** Spread a table of step h = m g onto step g (zeros between entries). */
export function restep(t: LatticeTable, g: number): LatticeTable {
  if (t.p.length === 1) return { ...t, step: g };
  const m = Math.round(t.step / g);
  if (m === 1) return { ...t, step: g };
  const out = new Float64Array((t.p.length - 1) * m + 1);
  for (let k = 0; k < t.p.length; k++) out[k * m] = t.p[k];
  // (the per-entry bounds spread alike: the entries between are exact zeros)
  const pe = pointErrOf(t);
  let pointErr: Float64Array | undefined;
  if (pe) {
    pointErr = new Float64Array(out.length);
    for (let k = 0; k < pe.length; k++) pointErr[k * m] = pe[k];
  }
  return { origin: t.origin, step: g, p: out, tailMass: t.tailMass, ...(pointErr ? { pointErr } : {}) };
}

/**
 * Convolution of tabulated lattice laws (common step after restepping to the real gcd of the steps); result
 * truncated to maxLength with the dropped mass added to tailMass. Throws when the steps are incommensurate.
 */
export function convolveTables(tables: LatticeTable[], maxLength = MAX_LATTICE): LatticeTable {
  if (tables.length === 0) throw new CfError("invalid_model", "", "Nothing to convolve.");
  let g = 0;
  for (const t of tables) {
    checkDeadline("convolve");
    if (t.p.length === 1) continue;
    const c = commonStep(g, t.step);
    if (c === null) throw new CfError("not_applicable", "", `Lattice steps ${g} and ${t.step} are not commensurate; the sum is not a lattice law.`);
    g = c;
  }
  if (g === 0) g = tables[0].step || 1;
  // each table's rounding bound, where known, follows the convolutions (./table-rounding.ts); restepping moves no value
  const steps = tables.map((t) => ({ ...restep(t, g), round: roundOf(t) ?? undefined })).sort((x, y) => x.p.length - y.p.length);
  let acc = steps[0].p;
  let round: TableRound | undefined = steps[0].round;
  // per-entry bounds, while every product is a direct one (./table-rounding.ts convolvedPointErr)
  let accErr: Float64Array | null = pointErrOf(steps[0]);
  let origin = steps[0].origin;
  // the mass past the table, carried as a product (the exact law A + B leaves the table A_T * B_T with mass
  // tA (|B_T| + tB) + |A_T| tB, plus what the truncation drops), not as 1 - sum, whose cancellation loses it below u
  let tail = steps[0].tailMass;
  const U = Number.EPSILON / 2;
  for (let i = 1; i < steps.length; i++) {
    const a = truncate(acc, maxLength);
    const b = truncate(steps[i].p, maxLength);
    const ta = tail + sum(acc.subarray(a.length));
    const tb = steps[i].tailMass + sum(steps[i].p.subarray(b.length));
    const c = convolve(a, b);
    acc = truncate(c, maxLength);
    const eb = pointErrOf(steps[i]);
    accErr = accErr && eb && !convolveByFft(a.length, b.length) ? convolvedPointErr(a, b, accErr.subarray(0, a.length), eb.subarray(0, b.length), c, acc.length) : null;
    const rb = steps[i].round;
    const la = round?.l1 ?? 0;
    round = round && rb ? convolvedRound(a, b, round, rb, convolveByFft(a.length, b.length), nextPowerOfTwo(a.length + b.length - 1), c, acc.length) : undefined;
    origin += steps[i].origin;
    // (the exact tables' masses within their l1 bounds of the sums; the dropped entries within the product's)
    const sa = sum(a) + la;
    const sb = sum(b) + (rb?.l1 ?? 0);
    const dropped = c.length > acc.length ? sum(c.subarray(acc.length)) + (round?.l1 ?? 0) : 0;
    tail = (ta * (sb + tb) + sa * tb + dropped) * (1 + (a.length + b.length + c.length + 8) * 2 * U);
  }
  const p = acc.length === acc.buffer.byteLength / 8 ? acc : acc.slice();
  // (the inputs' cut tails land inside the result's range: tailFrom 0 says so to a reader that places them)
  return { origin, step: g, p, tailMass: Math.min(tail, 1), tailFrom: 0, ...(round ? { round } : {}), ...(accErr && accErr.length === p.length ? { pointErr: accErr } : {}) };
}

/**
 * The convolution of two tables with per-entry relative bounds (pointRel, non-decreasing) on one step, by direct sums,
 * with such a bound again: c_k = sum_i a_i b_{k-i}, each product's inputs within rho_a(i) + rho_b(k - i) + their
 * product <= rho_a(k) + rho_b(k) + their product (non-decreasing; capped at each table's last entry), and the sum of at
 * most m = min(la, lb) non-negative products within gamma_{m+1} of itself (Higham, Accuracy and Stability of Numerical
 * Algorithms, 2nd ed., sec. 3.1). The mass past the result: tA (|B| + tB) + |A| tB plus the entries past maxLength,
 * each table's exact mass within its last entry's relative bound of its sum. Null where a table has no pointRel, the
 * steps differ or the origins' sum rounds.
 */
export function convolveRelTables(a: LatticeTable, b: LatticeTable, maxLength = MAX_LATTICE): LatticeTable | null {
  const ra = a.pointRel;
  const rb = b.pointRel;
  const origin = a.origin + b.origin;
  if (!ra || !rb || a.step !== b.step || twoSumErr(a.origin, b.origin, origin) !== 0) return null;
  const la = a.p.length;
  const lb = b.p.length;
  const c = convolveDirect(a.p, b.p);
  const p = c.length > maxLength ? c.slice(0, maxLength) : c;
  const u = Number.EPSILON / 2;
  const m = Math.min(la, lb) + 1;
  const g = (m * u) / (1 - m * u);
  const rel = (k: number) => {
    const x = ra(Math.min(k, la - 1));
    const y = rb(Math.min(k, lb - 1));
    return ((x + y + x * y + g) / (1 - g)) * (1 + 4 * u);
  };
  const up = 1 + (la + lb + c.length + 8) * 2 * u;
  const sa = sum(a.p) * (1 + ra(la - 1)) * up;
  const sb = sum(b.p) * (1 + rb(lb - 1)) * up;
  const dropped = c.length > p.length ? sum(c.subarray(p.length)) * (1 + rel(c.length - 1)) * up : 0;
  const tailMass = Math.min((a.tailMass * (sb + b.tailMass) + sa * b.tailMass + dropped) * up, 1);
  // the mass a cut table misses lies from its cut on, plus the other's first index (0 at the least): the result misses
  // mass from the nearer cut on, inside its own range
  const cutA = a.tailMass > 0 ? (a.tailFrom ?? la) : Infinity;
  const cutB = b.tailMass > 0 ? (b.tailFrom ?? lb) : Infinity;
  const tailFrom = Math.min(cutA, cutB, dropped > 0 ? p.length : Infinity, p.length);
  return { origin, step: a.step, p, tailMass, tailFrom, pointRel: rel };
}

/**
 * n-fold convolution power of a lattice table. Small results by repeated squaring (direct or FFT convolutions), which
 * carry the input's rounding bound through each product (./table-rounding.ts convolvedRound); large ones by one
 * zero-padded FFT with the pointwise power |z|^n e^{i n arg z} (no wrap-around since the padded size covers the full
 * support n (L-1) + 1), without a derived bound (the table is then not used as exact), unless `bounded` asks for the
 * squaring route. Mass (sum p)^n is conserved to rounding.
 */
export function powerTable(t: LatticeTable, n: number, maxLength = MAX_LATTICE, bounded = false): LatticeTable {
  if (!Number.isInteger(n) || n < 1) throw new CfError("invalid_model", "/repeat", `repeat must be a whole number >= 1, got ${n}.`);
  const L = t.p.length;
  const full = n * (L - 1) + 1;
  const inMass = sum(t.p) + t.tailMass;
  if (L === 1) return { origin: n * t.origin, step: t.step, p: Float64Array.of(t.p[0] ** n), tailMass: Math.max(0, inMass ** n - t.p[0] ** n) };
  let p: Float64Array;
  // `bounded`: a table with a derived rounding bound takes repeated squaring, whose bounds follow each product; the
  // frequency-domain power (more accurate in the far tails, but without a derived bound yet) serves the others
  const inRound = roundOf(t);
  if (full > 8192 && full <= 2 ** 22 && n > 8 && !(bounded && inRound)) {
    const N = nextPowerOfTwo(full);
    const plan = getFftPlan(N);
    const z = plan.a;
    const Z = plan.b;
    z.fill(0);
    for (let k = 0; k < L; k++) z[2 * k] = t.p[k];
    let shift = 0;
    if (L * N <= 3e7) {
      // centred log of the DFT by direct sums: w_k = sum_j p_j e^{-2 pi i k (j - mu)/N}, log w_k = log S +
      // log1p(sum_j p_j (e^{i th} - 1) / S) with e^{i th} - 1 = (-2 sin^2(th/2), sin th). Centring keeps the phase
      // n arg w_k small where |w_k| matters, and log1p keeps n log|w_k| accurate near |w_k| = 1; a plain FFT
      // followed by z^n multiplies its rounding by n. The mean's phase is restored as an integer circular shift c
      // plus a fractional phase.
      const S = inMass - t.tailMass;
      const logS = Math.log(S);
      let mu = 0;
      for (let j = 0; j < L; j++) mu += j * t.p[j];
      mu /= S;
      const total = n * mu;
      shift = Math.floor(total);
      const frac = total - shift;
      for (let k = 0; k < N; k++) {
        const kk = k <= N / 2 ? k : k - N;
        let dr = 0;
        let di = 0;
        for (let j = 0; j < L; j++) {
          const th = (-2 * Math.PI * kk * (j - mu)) / N;
          const sh = Math.sin(0.5 * th);
          dr += t.p[j] * (-2 * sh * sh);
          di += t.p[j] * Math.sin(th);
        }
        dr /= S;
        di /= S;
        const lr = n * (0.5 * Math.log1p(2 * dr + dr * dr + di * di) + logS);
        const li = n * Math.atan2(di, 1 + dr) - (2 * Math.PI * kk * frac) / N;
        const m = Math.exp(lr);
        z[2 * k] = m * Math.cos(li);
        z[2 * k + 1] = m * Math.sin(li);
      }
    } else {
      plan.forward(z, Z);
      for (let k = 0; k < N; k++) {
        const r = Math.hypot(Z[2 * k], Z[2 * k + 1]);
        const a = Math.atan2(Z[2 * k + 1], Z[2 * k]);
        const m = r ** n;
        z[2 * k] = m * Math.cos(n * a);
        z[2 * k + 1] = m * Math.sin(n * a);
      }
    }
    plan.inverse(z, Z);
    const len = Math.min(full, maxLength);
    p = new Float64Array(len);
    for (let k = 0; k < len; k++) {
      const v = Z[2 * (((k - shift) % N + N) % N)];
      p[k] = v > 0 ? v : 0;
    }
  } else {
    let result: Float64Array | null = null;
    let base = truncate(t.p, maxLength);
    // the rounding bounds follow each product (./table-rounding.ts), where the input's is known
    let rr: TableRound | undefined;
    let rb: TableRound | undefined = inRound ?? undefined;
    const step = (x: Float64Array, y: Float64Array, rx: TableRound | undefined, ry: TableRound | undefined): [Float64Array, TableRound | undefined] => {
      const c = convolve(x, y);
      const kept = truncate(c, maxLength);
      const r = rx && ry ? convolvedRound(x, y, rx, ry, convolveByFft(x.length, y.length), nextPowerOfTwo(x.length + y.length - 1), c, kept.length) : undefined;
      return [kept, r];
    };
    let e = n;
    while (e > 0) {
      if (e & 1) {
        if (result) [result, rr] = step(result, base, rr, rb);
        else [result, rr] = [base.slice(), rb];
      }
      e >>= 1;
      if (e > 0) [base, rb] = step(base, base, rb, rb);
    }
    p = result as Float64Array;
    if (p.length !== p.buffer.byteLength / 8) p = p.slice();
    return { origin: n * t.origin, step: t.step, p, tailMass: Math.max(0, inMass ** n - sum(p)), ...(rr ? { round: rr } : {}) };
  }
  // (the frequency-domain power carries no derived rounding bound yet: the table is offered without one)
  return { origin: n * t.origin, step: t.step, p, tailMass: Math.max(0, inMass ** n - sum(p)) };
}

export { panjer, type PanjerCount } from "./panjer";
