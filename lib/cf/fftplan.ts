import FFT from "fft.js";

/**
 * One fft.js instance per power-of-two size with two reusable interleaved complex buffers
 * (re0, im0, re1, im1, ...). fft.js builds its twiddle and bit-reversal tables in the constructor,
 * so building once per size and reusing is what keeps repeated transforms cheap.
 *
 * The buffers are scratch space shared by every caller of the same size: they are valid only until the
 * next synchronous use of the plan. Callers copy results out before handing control back.
 */
export interface FftPlan {
  readonly size: number;
  readonly fft: FFT;
  /** interleaved complex scratch, length 2*size */
  readonly a: Float64Array;
  /** interleaved complex scratch, length 2*size */
  readonly b: Float64Array;
  /** forward DFT X_k = sum_j x_j e^{-2 pi i jk/N} of interleaved `input` into interleaved `output`. */
  forward(input: Float64Array, output: Float64Array): void;
  /** inverse DFT x_j = (1/N) sum_k X_k e^{+2 pi i jk/N}; fft.js divides by N. */
  inverse(input: Float64Array, output: Float64Array): void;
  /** real-input forward DFT; fills the whole spectrum (fft.js realTransform + completeSpectrum). */
  forwardReal(input: Float64Array, output: Float64Array): void;
}

const MAX_CACHED_SIZES = 24;
const cache = new Map<number, FftPlan>();

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 2 && (n & (n - 1)) === 0 && n <= 2 ** 30;
}

/** Smallest power of two >= n (and >= 2). */
export function nextPowerOfTwo(n: number): number {
  let p = 2;
  while (p < n) p *= 2;
  return p;
}

/** The cached plan for `size` (a power of two >= 2); built on first use. */
export function getFftPlan(size: number): FftPlan {
  const hit = cache.get(size);
  if (hit) {
    // refresh recency for the small LRU
    cache.delete(size);
    cache.set(size, hit);
    return hit;
  }
  if (!isPowerOfTwo(size)) throw new RangeError(`FFT size must be a power of two >= 2, got ${size}`);
  const fft = typedFft(size);
  const plan: FftPlan = {
    size,
    fft,
    a: new Float64Array(2 * size),
    b: new Float64Array(2 * size),
    forward(input, output) {
      fft.transform(output, input);
    },
    inverse(input, output) {
      fft.inverseTransform(output, input);
    },
    forwardReal(input, output) {
      fft.realTransform(output, input);
      fft.completeSpectrum(output);
    },
  };
  cache.set(size, plan);
  if (cache.size > MAX_CACHED_SIZES) {
    const oldest = cache.keys().next().value as number;
    cache.delete(oldest);
  }
  return plan;
}

/**
 * An fft.js instance whose twiddle and bit-reversal tables are typed arrays (its constructor builds them in plain
 * arrays: for a new size of 2^17 to 2^18 some 20-30 ms against 5-9 ms; a request's first damped density at 1000 points
 * meets one or two new sizes). The twiddles e^{-2 pi i m / N}, m < N, from cos and sin of the first octant's angles
 * 2 pi m / N <= pi / 4 alone by the exact symmetries (cos and sin swapped about pi / 4, signs about pi / 2 and pi): a
 * quarter of the calls, and each entry within an ulp plus the angle's rounding (2u of at most pi / 4) of its exact value,
 * closer than fft.js's own for angles past pi / 4 (2u of up to 2 pi).
 */
function typedFft(size: number): FFT {
  const f = Object.create(FFT.prototype) as FFT & Record<string, unknown>;
  const table = new Float64Array(size * 2);
  if (size < 8) {
    for (let i = 0; i < table.length; i += 2) {
      const angle = (Math.PI * i) / size;
      table[i] = Math.cos(angle);
      table[i + 1] = -Math.sin(angle);
    }
  } else {
    const q = size >> 2;
    const o = size >> 3;
    const c = new Float64Array(q + 1);
    const s = new Float64Array(q + 1);
    for (let m = 0; m <= o; m++) {
      const angle = (Math.PI * 2 * m) / size;
      c[m] = Math.cos(angle);
      s[m] = Math.sin(angle);
    }
    // (o, q]: cos(pi/2 - x) = sin x, sin(pi/2 - x) = cos x
    for (let m = o + 1; m <= q; m++) {
      c[m] = s[q - m];
      s[m] = c[q - m];
    }
    for (let m = 0; m < size; m++) {
      let cm: number;
      let sm: number;
      if (m <= q) {
        cm = c[m];
        sm = s[m];
      } else if (m <= 2 * q) {
        // cos(pi - x) = -cos x, sin(pi - x) = sin x
        cm = -c[2 * q - m];
        sm = s[2 * q - m];
      } else if (m <= 3 * q) {
        // cos(pi + x) = -cos x, sin(pi + x) = -sin x
        cm = -c[m - 2 * q];
        sm = -s[m - 2 * q];
      } else {
        // cos(2 pi - x) = cos x, sin(2 pi - x) = -sin x
        cm = c[4 * q - m];
        sm = -s[4 * q - m];
      }
      table[2 * m] = cm;
      table[2 * m + 1] = -sm;
    }
  }
  let power = 0;
  for (let t = 1; size > t; t <<= 1) power++;
  const width = power % 2 === 0 ? power - 1 : power;
  const bitrev = new Int32Array(1 << width);
  for (let j = 0; j < bitrev.length; j++) {
    let v = 0;
    for (let shift = 0; shift < width; shift += 2) v |= ((j >>> shift) & 3) << (width - shift - 2);
    bitrev[j] = v;
  }
  Object.assign(f, { size, _csize: size << 1, table, _width: width, _bitrev: bitrev, _out: null, _data: null, _inv: 0 });
  return f;
}

/** Drop every cached plan (tests and memory pressure). */
export function clearFftPlans(): void {
  cache.clear();
}

/** the odd factors a composite size may carry (forwardRange): sizes m 2^p with m <= 15 are within 12.5% of any n */
const MAX_ODD = 15;

/** N = m P with m odd and P a power of two (P >= 4 unless N is a power of two itself) */
export function splitSize(N: number): { m: number; P: number } {
  let P = 1;
  while (N % (2 * P) === 0) P *= 2;
  return { m: N / P, P };
}

/** Smallest m 2^p >= n with m odd, m <= 15 and 2^p >= 4 (a power of two for n <= 4): the sizes forwardRange takes. */
export function compositeSize(n: number): number {
  let best = nextPowerOfTwo(n);
  for (let m = 3; m <= MAX_ODD; m += 2) {
    const N = m * Math.max(4, nextPowerOfTwo(Math.ceil(n / m)));
    if (N >= n && N < best) best = N;
  }
  return best;
}

/**
 * Rounding of forwardRange's combining step beyond the size-P transforms', in unit roundoffs u = eps/2 per unit of the
 * inputs' absolute sum: each output is sum_r w_r Y_r with |Y_r| at most the r-th subsequence's absolute sum (the
 * subsequences partition the inputs, so the transforms' own errors add to at most their levels' share of the whole sum, as
 * for one transform of size N); the twiddle w_r from cos and sin of fl(2 pi (r j mod N) / N), an angle below 2 pi within
 * 3 u relative (19 u) and the functions within an ulp (2 u), so within 30 u as a complex number; the complex product
 * sqrt(2) gamma_2 (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 3.6) and the m-term sum m - 1
 * (eq. 4.4): m + 32 in all, taken as m + 48; 0 for a power of two.
 */
export function combineRounding(N: number): number {
  const { m } = splitSize(N);
  return m === 1 ? 0 : m + 48;
}

let wide = new Float64Array(0);

/** an interleaved complex scratch of N values for a composite size's input (valid until the next call) */
export function compositeInput(N: number): Float64Array {
  if (wide.length < 2 * N) wide = new Float64Array(2 * N);
  return wide.subarray(0, 2 * N);
}

/**
 * X_j = sum_n x_n e^{-2 pi i j n / N} for j = j0 .. j0 + count - 1 only, N = m P (splitSize): decimation in time,
 * X_j = sum_r e^{-2 pi i r j / N} Y_r(j mod P) with Y_r the size-P transform of x_{r + m n} (Cooley & Tukey 1965), so m
 * transforms of size P and m products an output. `input` interleaved (2 N doubles, left as it was), `output` interleaved
 * (2 count doubles, from j0).
 */
export function forwardRange(N: number, input: Float64Array, j0: number, count: number, output: Float64Array): void {
  const { m, P } = splitSize(N);
  const plan = getFftPlan(P);
  if (m === 1) {
    plan.forward(input, plan.b);
    output.set(plan.b.subarray(2 * j0, 2 * (j0 + count)));
    return;
  }
  const a = plan.a;
  const b = plan.b;
  output.fill(0, 0, 2 * count);
  for (let r = 0; r < m; r++) {
    for (let n = 0; n < P; n++) {
      const s = 2 * (r + m * n);
      a[2 * n] = input[s];
      a[2 * n + 1] = input[s + 1];
    }
    plan.forward(a, b);
    for (let q = 0; q < count; q++) {
      const j = j0 + q;
      const p = 2 * (j % P);
      const yr = b[p];
      const yi = b[p + 1];
      if (r === 0) {
        output[2 * q] += yr;
        output[2 * q + 1] += yi;
        continue;
      }
      const ang = (2 * Math.PI * ((r * j) % N)) / N;
      const wr = Math.cos(ang);
      const wi = -Math.sin(ang);
      output[2 * q] += wr * yr - wi * yi;
      output[2 * q + 1] += wr * yi + wi * yr;
    }
  }
}
