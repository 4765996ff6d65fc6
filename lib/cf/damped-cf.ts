import type { Node } from "./node";
import { checkDeadline } from "./deadline";
import { scratch } from "./damped-scratch";

/**
 * Damped (exponentially tilted) cumulant functions L(beta, t) = log E[exp((i t - beta) X)], beta >= 0, for laws
 * bounded below: the transform used by the damped inversion of nonnegative aggregate laws (Abate & Whitt 1992,
 * Numerical inversion of probability generating functions; Grubel & Hermesmeier 1999, Computation of compound
 * distributions II). The imaginary part is any branch (only exp(L) is used). Also the typed bound on the absolute
 * error of each node's CF values (numerical CFs declare theirs; operators propagate it).
 */
export type DampedLogCf = (beta: number, t: Float64Array, re: Float64Array, im: Float64Array) => void;

/** X + Y + ...: the logs add. */
export function sumDamped(cs: Node[]): DampedLogCf | undefined {
  if (!cs.every((c) => c.dampedLogCf)) return undefined;
  return (beta, t, re, im) => {
    cs[0].dampedLogCf!(beta, t, re, im);
    const r2 = new Float64Array(t.length);
    const i2 = new Float64Array(t.length);
    for (let j = 1; j < cs.length; j++) {
      cs[j].dampedLogCf!(beta, t, r2, i2);
      for (let k = 0; k < t.length; k++) {
        re[k] += r2[k];
        im[k] += i2[k];
      }
    }
  };
}

/** aX, a > 0: L_X(a beta, a t). */
export function scaleDamped(a: number, c: Node): DampedLogCf | undefined {
  if (!(a > 0) || !c.dampedLogCf) return undefined;
  return (beta, t, re, im) => c.dampedLogCf!(a * beta, t.map((v) => a * v), re, im);
}

/** X + b: L_X + (i t - beta) b. */
export function shiftDamped(b: number, c: Node): DampedLogCf | undefined {
  if (!c.dampedLogCf) return undefined;
  return (beta, t, re, im) => {
    c.dampedLogCf!(beta, t, re, im);
    for (let k = 0; k < t.length; k++) {
      re[k] -= beta * b;
      im[k] += t[k] * b;
    }
  };
}

/**
 * X + b for the rectangular transform (Node.dampedCf): phi_X e^{(i t - beta) b}. A node built by spreading another and
 * moving it must set this with its shifted dampedLogCf (else a compound would take the unshifted transform).
 */
export function shiftDampedCf(b: number, c: Node): DampedLogCf | undefined {
  if (!c.dampedCf) return undefined;
  return (beta, t, re, im) => {
    c.dampedCf!(beta, t, re, im);
    const g = Math.exp(-beta * b);
    for (let k = 0; k < t.length; k++) {
      const cs = Math.cos(t[k] * b);
      const sn = Math.sin(t[k] * b);
      const r = re[k] * cs - im[k] * sn;
      im[k] = g * (re[k] * sn + im[k] * cs);
      re[k] = g * r;
    }
  };
}

/** Mixture: log sum_j w_j exp(L_j), with the largest real part factored out. */
export function mixDamped(ws: number[], cs: Node[]): DampedLogCf | undefined {
  if (!cs.every((c) => c.dampedLogCf)) return undefined;
  return (beta, t, re, im) => {
    const parts = cs.map((c) => {
      const r = new Float64Array(t.length);
      const i = new Float64Array(t.length);
      c.dampedLogCf!(beta, t, r, i);
      return [r, i] as const;
    });
    for (let k = 0; k < t.length; k++) {
      let m = -Infinity;
      for (const [r] of parts) m = Math.max(m, r[k]);
      let sr = 0;
      let si = 0;
      for (let j = 0; j < parts.length; j++) {
        const a = ws[j] * Math.exp(parts[j][0][k] - m);
        sr += a * Math.cos(parts[j][1][k]);
        si += a * Math.sin(parts[j][1][k]);
      }
      re[k] = m + Math.log(Math.hypot(sr, si));
      im[k] = Math.atan2(si, sr);
    }
  };
}

/**
 * Compound: K_N(L_X), the count's cumulant function at the complex point L_X (Re <= 0); where the severity gives its
 * transform phi rectangular and the count log P_N(phi) from it (Poisson: lambda (phi - 1)), that, with no log and exp of phi
 */
export function compoundDamped(N: Node, X: Node): DampedLogCf | undefined {
  if (!N.countCgf || !X.dampedLogCf) return undefined;
  if (X.dampedCf && N.countLogPgf) {
    const rect = X.dampedCf;
    const logPgf = N.countLogPgf;
    return (beta, t, re, im) => {
      // reused buffers (./damped-scratch.ts): a severity with a rectangular transform is no compound, so no call below
      // takes these slots
      const a = scratch("cmpRe", t.length);
      const b = scratch("cmpIm", t.length);
      rect(beta, t, a, b);
      logPgf(a, b, re, im);
    };
  }
  return (beta, t, re, im) => {
    const a = new Float64Array(t.length);
    const b = new Float64Array(t.length);
    X.dampedLogCf!(beta, t, a, b);
    N.countCgf!(a, b, re, im);
  };
}

/** Point mass at x: (i t - beta) x. */
export function pointDamped(x: number): DampedLogCf {
  return (beta, t, re, im) => {
    for (let k = 0; k < t.length; k++) {
      re[k] = -beta * x;
      im[k] = t[k] * x;
    }
  };
}

/** Gamma(shape a, rate r): L = -a log(1 + (beta - i t)/r) (JKB vol. 1, ch. 17, with s = beta - i t). */
export function gammaDamped(a: number, r: number): DampedLogCf {
  return (beta, t, re, im) => {
    for (let k = 0; k < t.length; k++) {
      const ur = 1 + beta / r;
      const ui = -t[k] / r;
      re[k] = -a * 0.5 * Math.log(ur * ur + ui * ui);
      im[k] = -a * Math.atan2(ui, ur);
    }
  };
}

/** Wrap a per-point evaluator of E[exp((i t - beta) X)] for t >= 0 (negative t by conjugation). */
export function fromPhiDamped(phi: (t: number, beta: number, out: Float64Array) => void): DampedLogCf {
  const tmp = new Float64Array(2);
  return (beta, t, re, im) => {
    for (let k = 0; k < t.length; k++) {
      if ((k & 15) === 0) checkDeadline("cf-quadrature");
      const x = t[k];
      phi(Math.abs(x), beta, tmp);
      re[k] = Math.log(Math.hypot(tmp[0], tmp[1]));
      im[k] = (x < 0 ? -1 : 1) * Math.atan2(tmp[1], tmp[0]);
    }
  };
}
