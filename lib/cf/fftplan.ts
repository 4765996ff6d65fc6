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
  const fft = new FFT(size);
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

/** Drop every cached plan (tests and memory pressure). */
export function clearFftPlans(): void {
  cache.clear();
}
