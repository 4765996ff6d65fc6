/**
 * Gauss-Legendre rules on [0, 1] and composite integration of g(x) f(x) over panels: the one helper behind every law
 * restricted to an interval (the truncated normal, the per-claim layer, the discretised severity's cells).
 */

const RULES = new Map<number, { x: Float64Array; w: Float64Array }>();

/** Gauss-Legendre nodes and weights on [0, 1] by Newton's method on P_n (Abramowitz & Stegun 25.4.29); cached per n. */
export function gaussLegendre(n: number): { x: Float64Array; w: Float64Array } {
  const hit = RULES.get(n);
  if (hit) return hit;
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 1;
    for (let it = 0; it < 100; it++) {
      let p0 = 1;
      let p1 = z;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * z * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      dp = (n * (z * p1 - p0)) / (z * z - 1);
      const dz = p1 / dp;
      z -= dz;
      if (Math.abs(dz) < 1e-16) break;
    }
    x[i] = (1 - z) / 2;
    w[i] = 1 / ((1 - z * z) * dp * dp);
  }
  const rule = { x, w };
  RULES.set(n, rule);
  return rule;
}

/**
 * int g(x) f(x) dx over [b_0, b_last] for a complex-valued g, by an n-point Gauss-Legendre rule on each panel
 * [b_j, b_{j+1}] split into `split(width)` equal parts (a law f restricted to an interval: its partial CF or moments).
 */
export function restrictedIntegral(
  bounds: readonly number[],
  f: (x: number) => number,
  g: (x: number) => [number, number],
  split: (width: number) => number,
  n = 16,
): [number, number] {
  const GL = gaussLegendre(n);
  let sr = 0;
  let si = 0;
  for (let j = 0; j + 1 < bounds.length; j++) {
    const a = bounds[j];
    const wAll = bounds[j + 1] - a;
    if (!(wAll > 0)) continue;
    const m = split(wAll);
    const w = wAll / m;
    for (let q = 0; q < m; q++) {
      const lo = a + q * w;
      for (let k = 0; k < GL.x.length; k++) {
        const x = lo + GL.x[k] * w;
        const fx = GL.w[k] * w * f(x);
        if (fx === 0) continue;
        const [gr, gi] = g(x);
        sr += fx * gr;
        si += fx * gi;
      }
    }
  }
  return [sr, si];
}
