/**
 * Summary of a dataset: n, mean, sd, min, quartiles, max, skewness g1 and excess kurtosis g2.
 * Moments use the two-pass formulas (Chan, Golub & LeVeque 1983: sum of squared deviations from the mean).
 *   g1 = m3 / m2^(3/2),  g2 = m4 / m2^2 - 3,  m_k = sum w (x - mean)^k / W  (Joanes & Gill 1998, eq. 1-2)
 * Unweighted and counts (a frequency table, the expanded sample): sd divides by N - 1 and the quartiles are
 * Hyndman & Fan (1996) type 7, x_(floor h) + (h - floor h)(x_(floor h + 1) - x_(floor h)), h = (N - 1) p.
 * Real weights describe a law, not a sample: sd divides by W and quartiles invert its CDF (type 1).
 */
export interface DatasetSummary {
  /** rows kept */
  rows: number;
  /** sample size: rows, or the sum of counts; the sum of weights for real weights */
  n: number;
  weightKind: "none" | "counts" | "weights";
  mean: number;
  /** null when n < 2 (sample) */
  sd: number | null;
  sdDivisor: "n-1" | "sum of weights";
  min: number;
  q1: number;
  median: number;
  q3: number;
  max: number;
  quartileRule: "type 7" | "inverse cdf";
  /** null when the spread is zero */
  skewness: number | null;
  /** excess kurtosis; null when the spread is zero */
  kurtosis: number | null;
}

export interface Histogram {
  /** k + 1 equal-width edges from min to max (one bin when all values are equal) */
  edges: number[];
  /** per bin: number of values, or the sum of their weights */
  counts: number[];
}

/** Sorted positive-weight rows: values ascending, weights aligned. */
function sortedPairs(values: Float64Array, weights: Float64Array): { x: Float64Array; w: Float64Array } {
  const idx: number[] = [];
  for (let i = 0; i < values.length; i++) if (weights[i] > 0) idx.push(i);
  const order = Uint32Array.from(idx).sort((a, b) => values[a] - values[b]);
  const x = new Float64Array(order.length);
  const w = new Float64Array(order.length);
  for (let i = 0; i < order.length; i++) {
    x[i] = values[order[i]];
    w[i] = weights[order[i]];
  }
  return { x, w };
}

/** Type 7 quantiles of the sample that repeats x[i] c[i] times (c whole), without expanding it. */
function type7(x: Float64Array, c: Float64Array | null, total: number, ps: number[]): number[] {
  const at = (k: number) => {
    if (!c) return x[k];
    let cum = 0;
    for (let i = 0; i < x.length; i++) {
      cum += c[i];
      if (k < cum) return x[i];
    }
    return x[x.length - 1];
  };
  return ps.map((p) => {
    const h = (total - 1) * p;
    const lo = Math.floor(h);
    const f = h - lo;
    const a = at(lo);
    return f === 0 || lo + 1 >= total ? a : a + f * (at(lo + 1) - a);
  });
}

/** Smallest x with F(x) >= p for the weighted law (F a step function). */
function inverseCdf(x: Float64Array, w: Float64Array, total: number, ps: number[]): number[] {
  return ps.map((p) => {
    const target = p * total;
    let cum = 0;
    for (let i = 0; i < x.length; i++) {
      cum += w[i];
      if (cum >= target * (1 - 1e-15)) return x[i];
    }
    return x[x.length - 1];
  });
}

/** Summary statistics; `weights` null for a plain sample. Throws on an empty sample (the parser never yields one). */
export function summarize(values: Float64Array, weights: Float64Array | null = null, kind: "counts" | "weights" = "counts"): DatasetSummary {
  if (values.length === 0) throw new RangeError("summarize: empty sample");
  const weighted = weights !== null;
  let total = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const w = weighted ? weights[i] : 1;
    if (w === 0) continue;
    total += w;
    if (values[i] < min) min = values[i];
    if (values[i] > max) max = values[i];
  }
  // Sums run on values divided by a power-of-two scale, so 1e300-sized data neither overflows nor rounds.
  const big = Math.max(Math.abs(min), Math.abs(max));
  const s1 = big > 0 ? 2 ** Math.ceil(Math.log2(big)) : 1;
  let sx = 0;
  for (let i = 0; i < values.length; i++) sx += (weighted ? weights[i] : 1) * (values[i] / s1);
  const mean = (sx / total) * s1;
  const range = max - min;
  const s2 = range > 0 && Number.isFinite(range) ? 2 ** Math.ceil(Math.log2(range)) : s1;
  let m2 = 0;
  let m3 = 0;
  let m4 = 0;
  for (let i = 0; i < values.length; i++) {
    const w = weighted ? weights[i] : 1;
    const d = (values[i] - mean) / s2;
    const d2 = d * d;
    m2 += w * d2;
    m3 += w * d2 * d;
    m4 += w * d2 * d2;
  }
  const law = weighted && kind === "weights";
  const sd = law ? Math.sqrt(m2 / total) * s2 : total >= 2 ? Math.sqrt(m2 / (total - 1)) * s2 : null;
  const c2 = m2 / total;
  const spread = c2 > 0 && max > min;
  const ps = [0.25, 0.5, 0.75];
  let q: number[];
  if (!weighted) q = type7(Float64Array.from(values).sort(), null, values.length, ps);
  else {
    const { x, w } = sortedPairs(values, weights);
    q = law ? inverseCdf(x, w, total, ps) : type7(x, w, total, ps);
  }
  return {
    rows: values.length,
    n: total,
    weightKind: weighted ? kind : "none",
    mean,
    sd,
    sdDivisor: law ? "sum of weights" : "n-1",
    min,
    q1: q[0],
    median: q[1],
    q3: q[2],
    max,
    quartileRule: law ? "inverse cdf" : "type 7",
    skewness: spread ? m3 / total / c2 ** 1.5 : null,
    kurtosis: spread ? m4 / total / (c2 * c2) - 3 : null,
  };
}

/** Bins for a preview: the square-root choice k = ceil(sqrt(rows)) capped at `maxBins` (common practice). */
export function histogram(values: Float64Array, weights: Float64Array | null = null, maxBins = 40): Histogram {
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < values.length; i++) {
    if (weights && weights[i] === 0) continue;
    if (values[i] < min) min = values[i];
    if (values[i] > max) max = values[i];
  }
  if (!(max >= min)) return { edges: [], counts: [] };
  const k = max === min ? 1 : Math.max(1, Math.min(maxBins, Math.ceil(Math.sqrt(values.length))));
  const width = (max - min) / k;
  const counts = new Array<number>(k).fill(0);
  for (let i = 0; i < values.length; i++) {
    const w = weights ? weights[i] : 1;
    if (w === 0) continue;
    const b = width > 0 ? Math.min(Math.floor((values[i] - min) / width), k - 1) : 0;
    counts[b] += w;
  }
  const edges = Array.from({ length: k + 1 }, (_, i) => (i === k ? max : min + i * width));
  return { edges, counts };
}
