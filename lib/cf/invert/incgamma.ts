import { lgamma } from "../families/special";

/**
 * Regularized incomplete gamma P(a, z) and Q(a, z) = 1 - P, each computed directly (series for z < a + 1,
 * Lentz continued fraction otherwise; Press et al., Numerical Recipes 3rd ed., sec. 6.2), so that small values
 * of either keep their relative accuracy. Integer a uses the finite Poisson sum (A&S 26.4.21).
 */
export function incGamma(a: number, z: number): { P: number; Q: number } {
  if (!(z > 0)) return { P: 0, Q: 1 };
  if (Number.isInteger(a) && a <= 64) {
    let term = 1;
    let s = 1;
    for (let n = 1; n < a; n++) {
      term *= z / n;
      s += term;
    }
    const Q = Math.exp(-z) * s;
    if (Q < 0.5) return { P: 1 - Q, Q };
  }
  const lpre = a * Math.log(z) - z - lgamma(a);
  if (z < a + 1) {
    let ap = a;
    let del = 1 / a;
    let sum = del;
    for (let n = 0; n < 1000; n++) {
      ap += 1;
      del *= z / ap;
      sum += del;
      if (Math.abs(del) < Math.abs(sum) * 1e-17) break;
    }
    const P = sum * Math.exp(lpre);
    return { P, Q: 1 - P };
  }
  const tiny = 1e-300;
  let b = z + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 1000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-16) break;
  }
  const Q = Math.exp(lpre) * h;
  return { P: 1 - Q, Q };
}

/** Gamma(a, rate) density at y > 0. */
export function gammaPdf(a: number, rate: number, y: number): number {
  if (!(y > 0)) return a === 1 && y === 0 ? rate : 0;
  return Math.exp(a * Math.log(rate) + (a - 1) * Math.log(y) - rate * y - lgamma(a));
}
