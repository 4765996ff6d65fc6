// Hand-built CompiledModel objects with closed-form CFs, for testing the inversion independently of compile().
import type { Atom, CompiledModel, LawKind } from "@/lib/cf/types";

type LogCf = (t: number) => [number, number];

interface Spec {
  logCf: LogCf;
  kind?: LawKind;
  cumulants?: (number | null)[];
  location: number;
  scale: number;
  support?: [number, number];
  tails?: { left: number; right: number };
  momentIndex?: number;
}

export function build(s: Spec): CompiledModel {
  const logCf = (t: Float64Array, re: Float64Array, im: Float64Array) => {
    for (let i = 0; i < t.length; i++) {
      const [a, b] = s.logCf(t[i]);
      re[i] = a;
      im[i] = b;
    }
  };
  return {
    logCf,
    cf(t, re, im) {
      logCf(t, re, im);
      for (let i = 0; i < t.length; i++) {
        const m = Math.exp(re[i]);
        const p = im[i];
        re[i] = m * Math.cos(p);
        im[i] = m * Math.sin(p);
      }
    },
    kind: s.kind ?? { type: "continuous" },
    momentIndex: s.momentIndex ?? Infinity,
    cumulants: (n: number) => {
      const k = s.cumulants ?? [];
      const out: (number | null)[] = [];
      for (let i = 0; i < n; i++) out.push(i < k.length ? k[i] : null);
      return out;
    },
    location: s.location,
    scale: s.scale,
    support: s.support ?? [-Infinity, Infinity],
    tails: s.tails ?? { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [],
  };
}

/** Normal(mu, sigma): log phi = i mu t - sigma^2 t^2 / 2 (common practice). */
export function normal(mu: number, sigma: number): CompiledModel {
  return build({
    logCf: (t) => [-0.5 * sigma * sigma * t * t, mu * t],
    cumulants: [mu, sigma * sigma, 0, 0, 0, 0, 0, 0],
    location: mu,
    scale: sigma,
  });
}

/** Gamma(shape k, rate r): log phi = -k log(1 - i t / r) (Johnson, Kotz & Balakrishnan, vol. 1, ch. 17). */
export function gamma(k: number, r: number): CompiledModel {
  const cum: number[] = [];
  let f = 1;
  for (let n = 1; n <= 8; n++) {
    cum.push((k * f) / r ** n);
    f *= n;
  }
  return build({
    logCf: (t) => {
      const u = t / r;
      return [-0.5 * k * Math.log1p(u * u), k * Math.atan(u)];
    },
    cumulants: cum,
    location: k / r,
    scale: Math.sqrt(k) / r,
    support: [0, Infinity],
  });
}

/** Sum of n iid Uniform(0,1): log phi = n log((e^{it} - 1)/(it)) = n (i t/2 + log(sin(t/2)/(t/2))). */
export function irwinHall(n: number): CompiledModel {
  return build({
    logCf: (t) => {
      if (t === 0) return [0, 0];
      const s = Math.sin(t / 2) / (t / 2);
      // phase of sinc sign: pi when negative
      return [n * Math.log(Math.abs(s)), n * (t / 2 + (s < 0 ? Math.PI : 0))];
    },
    cumulants: [n / 2, n / 12, 0, -n / 120],
    location: n / 2,
    scale: Math.sqrt(n / 12),
    support: [0, n],
  });
}

/** Cauchy(loc, scale): log phi = i loc t - scale |t| (common practice). */
export function cauchy(loc: number, scale: number): CompiledModel {
  return build({
    logCf: (t) => [-scale * Math.abs(t), loc * t],
    cumulants: [],
    location: loc,
    scale,
    tails: { left: 1, right: 1 },
    momentIndex: 1,
  });
}

/** Symmetric alpha-stable, scale c: log phi = -|c t|^alpha (Nolan, Univariate Stable Distributions, Def. 1.3). */
export function symStable(alpha: number, c: number): CompiledModel {
  return build({
    logCf: (t) => [-Math.pow(Math.abs(c * t), alpha), 0],
    cumulants: [],
    location: 0,
    scale: c,
    tails: { left: alpha, right: alpha },
    momentIndex: alpha,
  });
}

/**
 * Levy(loc mu, scale c) = stable(1/2, 1) in S1: log phi = i mu t - sqrt(c |t|) (1 - i sgn t)
 * (Nolan, Univariate Stable Distributions, Example 1.4).
 */
export function levy(mu: number, c: number): CompiledModel {
  return build({
    logCf: (t) => {
      const a = Math.sqrt(c * Math.abs(t));
      return [-a, mu * t + Math.sign(t) * a];
    },
    cumulants: [],
    location: mu + c,
    scale: c,
    support: [mu, Infinity],
    tails: { left: Infinity, right: 0.5 },
    momentIndex: 0.5,
  });
}

/** Independent sum: log-CFs add. */
export function sum(...ms: CompiledModel[]): CompiledModel {
  const n = ms.length;
  const cum: (number | null)[] = [];
  for (let i = 0; i < 8; i++) {
    let s: number | null = 0;
    for (const m of ms) {
      const k = m.cumulants(8)[i];
      s = s === null || k === null ? null : s + k;
    }
    cum.push(s);
  }
  const lo = ms.reduce((s, m) => s + m.support[0], 0);
  const hi = ms.reduce((s, m) => s + m.support[1], 0);
  const logCf = (t: Float64Array, re: Float64Array, im: Float64Array) => {
    const r = new Float64Array(t.length);
    const q = new Float64Array(t.length);
    re.fill(0);
    im.fill(0);
    for (let j = 0; j < n; j++) {
      ms[j].logCf(t, r, q);
      for (let i = 0; i < t.length; i++) {
        re[i] += r[i];
        im[i] += q[i];
      }
    }
  };
  return {
    logCf,
    cf(t, re, im) {
      logCf(t, re, im);
      for (let i = 0; i < t.length; i++) {
        const m = Math.exp(re[i]);
        const p = im[i];
        re[i] = m * Math.cos(p);
        im[i] = m * Math.sin(p);
      }
    },
    kind: { type: "continuous" },
    momentIndex: Math.min(...ms.map((m) => m.momentIndex)),
    cumulants: (k: number) => cum.slice(0, k).concat(Array(Math.max(0, k - 8)).fill(null)),
    location: ms.reduce((s, m) => s + m.location, 0),
    scale: Math.sqrt(ms.reduce((s, m) => s + m.scale ** 2, 0)),
    support: [lo, hi],
    tails: { left: Math.min(...ms.map((m) => m.tails.left)), right: Math.min(...ms.map((m) => m.tails.right)) },
    nodes: n,
    notes: [],
  };
}

/**
 * Compound Poisson(lambda) of Exponential(rate 1): log phi = lambda (1/(1 - i t) - 1) (Klugman, Panjer & Willmot,
 * Loss Models, sec. 9.3); atom e^{-lambda} at 0.
 */
export function compoundPoissonExp(lambda: number, rate = 1): CompiledModel {
  const atoms: Atom[] = [{ x: 0, p: Math.exp(-lambda) }];
  const cum: number[] = [];
  let f = 1;
  for (let n = 1; n <= 8; n++) {
    f *= n;
    cum.push((lambda * f) / rate ** n);
  }
  return build({
    logCf: (t) => {
      const u = t / rate;
      const d = 1 + u * u;
      return [lambda * (1 / d - 1), (lambda * u) / d];
    },
    kind: { type: "mixed", atoms },
    cumulants: cum,
    location: lambda / rate,
    scale: Math.sqrt(2 * lambda) / rate,
    support: [0, Infinity],
  });
}

/** Collects failed comparisons and reports them all with inputs, value, expected, difference and tolerance. */
export class Checker {
  private fails: string[] = [];
  worst = 0;
  /** |value - expected| <= tol (absolute) */
  abs(label: string, value: number, expected: number, tol: number): void {
    const d = Math.abs(value - expected);
    if (d > this.worst) this.worst = d;
    if (!(d <= tol)) this.fails.push(`${label}: value ${value} expected ${expected} diff ${d.toExponential(3)} tol ${tol.toExponential(3)}`);
  }
  /** |value/expected - 1| <= tol (relative) */
  rel(label: string, value: number, expected: number, tol: number): void {
    const d = Math.abs(value / expected - 1);
    if (!(d <= tol)) this.fails.push(`${label}: value ${value} expected ${expected} rel diff ${d.toExponential(3)} tol ${tol.toExponential(3)}`);
  }
  /** the error estimate must not be smaller than the actual error */
  honest(label: string, value: number, expected: number, estimate: number): void {
    const d = Math.abs(value - expected);
    if (!(d <= estimate)) this.fails.push(`${label}: actual error ${d.toExponential(3)} above estimate ${estimate.toExponential(3)} (value ${value}, expected ${expected})`);
  }
  that(label: string, ok: boolean, detail = ""): void {
    if (!ok) this.fails.push(`${label} ${detail}`);
  }
  done(): void {
    if (this.fails.length) throw new Error(`${this.fails.length} check(s) failed:\n` + this.fails.slice(0, 40).join("\n"));
  }
}

/** Irwin-Hall density and cdf (Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions vol. 2, ch. 26, eq. 26.47-26.48). */
export function irwinHallPdf(n: number, x: number): number {
  if (x <= 0 || x >= n) return 0;
  let s = 0;
  let c = 1;
  for (let k = 0; k <= Math.floor(x); k++) {
    s += (k % 2 ? -1 : 1) * c * Math.pow(x - k, n - 1);
    c = (c * (n - k)) / (k + 1);
  }
  let f = 1;
  for (let i = 2; i < n; i++) f *= i;
  return s / f;
}
export function irwinHallCdf(n: number, x: number): number {
  if (x <= 0) return 0;
  if (x >= n) return 1;
  let s = 0;
  let c = 1;
  for (let k = 0; k <= Math.floor(x); k++) {
    s += (k % 2 ? -1 : 1) * c * Math.pow(x - k, n);
    c = (c * (n - k)) / (k + 1);
  }
  let f = 1;
  for (let i = 2; i <= n; i++) f *= i;
  return s / f;
}

/** Modified Bessel I1 by its power series (Abramowitz & Stegun 9.6.10), all terms positive. */
export function besselI1(z: number): number {
  let t = z / 2;
  let s = 0;
  for (let k = 0; k < 1000; k++) {
    s += t;
    t *= (z * z) / 4 / ((k + 1) * (k + 2));
    if (t < s * 1e-18) break;
  }
  return s;
}

/**
 * Compound Poisson(lambda) with Exponential(1) claims: density of the continuous part
 * f(x) = e^{-lambda - x} sqrt(lambda / x) I1(2 sqrt(lambda x)), x > 0: the Erlang mixture
 * sum_{n>=1} e^{-lambda} lambda^n/n! x^{n-1} e^{-x}/(n-1)! = e^{-lambda-x} sum_{m>=0} lambda^{m+1} x^m / (m! (m+1)!) summed by the
 * series I1(z) = sum_m (z/2)^{2m+1} / (m! (m+1)!) (Abramowitz & Stegun 9.6.10); cpExpPdfSeries sums the mixture itself,
 * and sf(x) = sum_{n>=1} P(N=n) e^{-x} sum_{k<n} x^k/k! (Erlang mixture; Klugman, Panjer & Willmot,
 * Loss Models, compound distributions with exponential severity).
 */
export function cpExpPdf(lambda: number, x: number): number {
  return x <= 0 ? 0 : Math.exp(-lambda - x) * Math.sqrt(lambda / x) * besselI1(2 * Math.sqrt(lambda * x));
}
export function cpExpPdfSeries(lambda: number, x: number): number {
  if (x <= 0) return 0;
  let pn = Math.exp(-lambda);
  let s = 0;
  let erl = Math.exp(-x); // x^{n-1} e^{-x}/(n-1)! for n = 1
  for (let n = 1; n < 2000; n++) {
    pn *= lambda / n;
    s += pn * erl;
    erl *= x / n;
    if (pn < 1e-300 || (n > lambda + x + 50 && pn * erl < s * 1e-18)) break;
  }
  return s;
}
export function cpExpSf(lambda: number, x: number): number {
  if (x < 0) return 1;
  let pn = Math.exp(-lambda);
  let inner = 0;
  let term = Math.exp(-x);
  let s = 0;
  for (let n = 1; n < 2000; n++) {
    pn *= lambda / n;
    inner += term;
    term *= x / n;
    s += pn * inner;
    if (pn < 1e-300 || (n > lambda + 50 && pn < s * 1e-18)) break;
  }
  return s;
}

/** Binomial(n, p) on 0..n: phi = (1 - p + p e^{it})^n (common practice); lattice origin 0 step 1. */
export function binomialLattice(n: number, p: number, withTable = false): CompiledModel {
  const m = build({
    logCf: (t) => {
      const re = 1 - p + p * Math.cos(t);
      const im = p * Math.sin(t);
      return [n * 0.5 * Math.log(re * re + im * im), n * Math.atan2(im, re)];
    },
    kind: { type: "lattice", origin: 0, step: 1 },
    cumulants: [n * p, n * p * (1 - p), n * p * (1 - p) * (1 - 2 * p), n * p * (1 - p) * (1 - 6 * p * (1 - p))],
    location: n * p,
    scale: Math.sqrt(n * p * (1 - p)),
    support: [0, n],
  });
  if (!withTable) return m;
  return {
    ...m,
    latticeTable: () => {
      const q = new Float64Array(n + 1);
      let c = 1;
      for (let k = 0; k <= n; k++) {
        q[k] = c * p ** k * (1 - p) ** (n - k);
        c = (c * (n - k)) / (k + 1);
      }
      // each entry's rounding (the table's derived bound; an exact table without one is left for the CF route): c by
      // k products and k divisions of exact integers (2k u), p^k and (1 - p)^(n - k) by pow (an ulp each; 1 - p rounded,
      // (n - k) u), the two products 2u: within (n + k + 8) u relative (Higham, Accuracy and Stability of Numerical
      // Algorithms, 2nd ed., sec. 3.1; 1.01 covers the second order)
      return { origin: 0, step: 1, p: q, tailMass: 0, pointRel: (k: number) => 1.01 * (n + k + 8) * (Number.EPSILON / 2) };
    },
  };
}

/** Poisson(lambda) on 0, h, 2h, ...: log phi = lambda (e^{ith} - 1) (common practice). */
export function poissonLattice(lambda: number, h = 1): CompiledModel {
  return build({
    logCf: (t) => [lambda * (Math.cos(t * h) - 1), lambda * Math.sin(t * h)],
    kind: { type: "lattice", origin: 0, step: h },
    cumulants: [lambda * h, lambda * h * h, lambda * h ** 3, lambda * h ** 4],
    location: lambda * h,
    scale: Math.sqrt(lambda) * h,
    support: [0, Infinity],
  });
}
