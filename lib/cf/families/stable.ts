import type { Node } from "../node";
import { linearLogRound, shiftLogRound } from "./log-round";

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
    logCf,
    ...stableLogRound(a, beta, g, loc, tan, logCf),
  };
  function logCf(t: Float64Array, re: Float64Array, im: Float64Array) {
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
  }
}

/**
 * Node.logRoundSlope of the stable law (./log-round.ts): |phi| = e^{-p}, p = |g t|^a. a = 2: normal, v = -(g t)^2, |v| e^v <=
 * g e^{-1/2} / sqrt 2 per unit |t| (largest at g t = 1/sqrt 2). beta = 0, a = 1: Cauchy, |v| e^v <= g |t|. 1 < a < 2: L - i loc t
 * is -p (1 - i beta tan(pi a/2) sgn t) (S1) or -p + i beta tan(pi a/2) sgn t (p - |g t|) (S0); with y = g |t|, e^{-p} p <=
 * c_a y, c_a = max_y y^{a-1} e^{-y^a} = ((a-1)/a)^{(a-1)/a} e^{-(a-1)/a} <= 1, and e^{-p} |y^a - y| <= y max(c_a, 1), so
 * |phi| |L| <= (|loc| + g (c_a + |beta tan(pi a/2)|)) |t| either way. a < 1 (e^{-p} p grows like |t|^a) and a = 1 with beta != 0
 * (|t| log|t|): not derived.
 */
function stableLogRound(a: number, beta: number, g: number, loc: number, tan: number, logCf: (t: Float64Array, re: Float64Array, im: Float64Array) => void) {
  if (a === 2) return shiftLogRound(loc, g * Math.SQRT1_2 * Math.exp(-0.5) * (1 + 8 * Number.EPSILON), (x) => -(g * x) * (g * x));
  if (a === 1) return beta === 0 ? shiftLogRound(loc, g, (x) => -g * Math.abs(x)) : {};
  if (a < 1) return {};
  const e = (a - 1) / a;
  const ca = Math.min(1, Math.pow(e, e) * Math.exp(-e) * (1 + 8 * Number.EPSILON));
  return linearLogRound((Math.abs(loc) + g * (ca + Math.abs(beta * tan))) * (1 + 8 * Number.EPSILON), logCf);
}
