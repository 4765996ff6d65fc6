/**
 * An upper bound on S(b) = sum_j c_j e^{-b e_j} (c_j >= 0, e_j > 0) at every b >= 0, from its values on a geometric grid:
 * S does not increase in b, so S(b) <= S(b_i) for the largest grid point b_i <= b. The quadrature CFs use it for the sum
 * of their terms' moduli (each term's rounding weight times its decay) at one frequency: their rounding, relative to
 * those moduli, falls with the frequency as the terms decay (./lognormal.ts, ./numeric.ts).
 */
export function decayTable(c: Float64Array, e: Float64Array): (b: number) => number {
  // built at the first call: a node whose bound is never asked per frequency pays nothing
  let table: ((b: number) => number) | null = null;
  return (b) => (table ??= build(c, e))(b);
}

function build(c: Float64Array, e: Float64Array): (b: number) => number {
  const n = c.length;
  let eMin = Infinity;
  let eMax = 0;
  for (let j = 0; j < n; j++) {
    if (!(c[j] > 0)) continue;
    eMin = Math.min(eMin, e[j]);
    eMax = Math.max(eMax, e[j]);
  }
  const sumAt = (b: number) => {
    let s = 0;
    for (let j = 0; j < n; j++) if (c[j] > 0) s += c[j] * Math.exp(-b * e[j]);
    // n positive terms, each within a few ulps (exp within one ulp, the project's standing assumption; the products
    // u), summed within (n - 1) u of their sum (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 4.2)
    return s * (1 + (n + 8) * Number.EPSILON);
  };
  const s0 = sumAt(0);
  if (!(eMax > 0) || !(s0 > 0)) return () => s0;
  // grid b_i = b_1 2^{(i-1)/4} from b_1 = 1e-3 / eMax (S(b_1) within 0.1% of S(0)) until every term has fallen below
  // 1e-40 of S(0) (b e_min >= 92 + log(n)), S below 1e-30 of S(0), or S, below 1e-3 of S(0), moved by less than 1% over
  // ten octaves (what is left decays only far beyond); past the last point its value bounds S (a bound, only looser)
  const b1 = 1e-3 / eMax;
  const bEnd = (92 + Math.log(n + 1)) / eMin;
  const grid: number[] = [0];
  const vals: number[] = [s0];
  for (let i = 0; i < 4096; i++) {
    const b = b1 * 2 ** (i / 4);
    grid.push(b);
    const v = sumAt(b);
    vals.push(v);
    if (b >= bEnd || v < 1e-30 * s0 || (i >= 40 && v < 1e-3 * s0 && v > 0.99 * vals[vals.length - 41])) break;
  }
  const last = grid.length - 1;
  return (b: number) => {
    if (!(b >= grid[1])) return vals[0];
    let i = Math.min(last, Math.floor(4 * Math.log2(b / b1)) + 1);
    while (i > 0 && grid[i] > b) i--;
    return vals[i];
  };
}
