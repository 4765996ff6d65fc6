import type { Node } from "../node";

/**
 * Stable law in Nolan's S0 or S1 parameterisation (Nolan, Univariate Stable Distributions, 2020,
 * ch. 1, definitions of S0 and S1):
 *  S1: log phi = -|g t|^a (1 - i b tan(pi a/2) sgn t) + i d t            (a != 1)
 *               -g|t| (1 + i b (2/pi) sgn t log|t|) + i d t                (a = 1)
 *  S0: log phi = -|g t|^a (1 + i b tan(pi a/2) sgn t (|g t|^{1-a} - 1)) + i d t   (a != 1)
 *               -g|t| (1 + i b (2/pi) sgn t log(g|t|)) + i d t            (a = 1)
 * In S0 the term tan(pi a/2)(|g t| - |g t|^a) is formed as -tan(pi a/2) |g t| expm1((a-1) log|g t|), which stays
 * accurate as a -> 1 where it tends to the a = 1 form.
 */
export function stable(alpha: number, beta: number, scale: number, loc: number, param: "S0" | "S1"): Node {
  const a = alpha;
  const g = scale;
  const isTwo = a === 2;
  const isOne = a === 1;
  const tan = isTwo || isOne ? 0 : Math.tan((Math.PI * a) / 2);
  // the other parameterisation's location: d1 = d0 - b g tan(pi a/2) (a != 1), d1 = d0 - b (2/pi) g log g (a = 1)
  const shift10 = isTwo ? 0 : isOne ? beta * (2 / Math.PI) * g * Math.log(g) : beta * g * tan;
  const d0 = param === "S0" ? loc : loc + shift10;
  const d1 = param === "S1" ? loc : loc - shift10;
  const left = isTwo ? Infinity : beta === 1 ? Infinity : a;
  const right = isTwo ? Infinity : beta === -1 ? Infinity : a;
  let support: [number, number] = [-Infinity, Infinity];
  if (a < 1 && beta === 1) support = [d1, Infinity];
  if (a < 1 && beta === -1) support = [-Infinity, d1];
  return {
    kind: { type: "continuous" },
    momentIndex: isTwo ? Infinity : a,
    tails: { left, right },
    nodes: 1,
    notes: [],
    location: d0,
    scale: isTwo ? Math.SQRT2 * g : g,
    support,
    cumulants(n) {
      const out: (number | null)[] = new Array(n).fill(null);
      if (isTwo) {
        if (n > 0) out[0] = loc;
        if (n > 1) out[1] = 2 * g * g;
        for (let k = 2; k < n; k++) out[k] = 0;
      } else if (a > 1 && n > 0) out[0] = d1; // the mean is the S1 location when 1 < alpha < 2
      return out;
    },
    logCf(t, re, im) {
      for (let k = 0; k < t.length; k++) {
        const x = t[k];
        if (x === 0) {
          re[k] = 0;
          im[k] = 0;
          continue;
        }
        const ax = Math.abs(g * x);
        const sg = x < 0 ? -1 : 1;
        if (isTwo) {
          re[k] = -ax * ax;
          im[k] = loc * x;
        } else if (isOne) {
          re[k] = -ax;
          const lg = param === "S1" ? Math.log(Math.abs(x)) : Math.log(ax);
          im[k] = loc * x - beta * (2 / Math.PI) * ax * sg * lg;
        } else {
          const p = Math.pow(ax, a);
          re[k] = -p;
          if (param === "S1") im[k] = loc * x + p * beta * tan * sg;
          else im[k] = loc * x + beta * tan * sg * ax * Math.expm1((a - 1) * Math.log(ax));
        }
      }
    },
  };
}
