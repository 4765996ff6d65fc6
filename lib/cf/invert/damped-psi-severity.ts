// The compound remainder's damped transform where the one-claim term shares the severity transform's values with psi
// (severityPsi), and the per-frequency error bounds evaluated stepwise along the nodes; see ./damped-psi.ts.
import type { Atom } from "../types";
import type { SeverityKernel } from "../severity-kernel";
import { scratch } from "../damped-scratch";

const EPS = Number.EPSILON;

/**
 * f(beta, t_k), at most `whole`, at every node: f does not increase in |t| (Node.dampedErrorAt's contract), so on the
 * inversion's increasing nodes it is evaluated once per run of STEP nodes and that value, taken at the run's smallest
 * |t|, bounds the run (any node below the run's first is evaluated itself)
 */
export function stepwise(f: (beta: number, t: number) => number, beta: number, t: Float64Array, whole: number): Float64Array {
  const out = new Float64Array(t.length);
  let from = Infinity;
  let v = whole;
  for (let k = 0; k < t.length; k++) {
    const x = Math.abs(t[k]);
    if (k % STEP === 0 || x < from) {
      from = x;
      v = Math.min(whole, f(beta, x));
    }
    out[k] = v;
  }
  return out;
}
const STEP = 32;

/**
 * psi_c = P_N(phi) - atoms - p_1 phi (- p_2 phi^2 with the two-claim term out) for a compound whose support starts at
 * 0, phi the severity's damped transform evaluated once for every term. Per-node error: rounding (16 eps per unit of
 * magnitude), the count's own CF error, and for an error d in phi sup |P_N'(z) - p_1 (- 2 p_2 z)| d <= E N |z|^j d,
 * |z| <= |phi| + d, j = 1 (2 with the two-claim term out: the sum then starts at n = 3), which falls with |phi|; or,
 * for a count that bounds its slope near a point (Poisson: |P_N'(z)| = lambda |P_N(z)| <= lambda |P_N(phi)| e^{lambda d}),
 * (that slope + p_1 + 2 p_2 |z|) d, which falls with |P_N(phi)| (Poisson(1000): far below E N d away from t = 0).
 * Where the severity and the count give phi and log P_N(phi) rectangular (no log and exp of phi), they are taken so,
 * and d is the bound the severity's route returns for these values.
 */
export function severityPsi(sev: SeverityKernel, count: NonNullable<SeverityKernel["count"]>, atoms: Atom[], beta: number, w2: number, planning: boolean) {
  const pa = atoms.reduce((s, a) => s + a.p, 0);
  // the severity's transform and the count's log-pgf taken rectangular where both have that form: no log and exp of phi
  const rect = !!(sev.dampedCf && count.logPgf);
  // each atom's damped weight and position once (an atom at 0, the count's P(N = 0): no phase to take, cos 0 = 1 and sin 0 = 0
  // exactly, the same values without the calls at every node)
  const ax = atoms.map((a) => a.x);
  const am = atoms.map((a) => a.p * Math.exp(-beta * a.x));
  // `also`: the same remainder with the two-claim term out as well (weight also.w2), from the same transform values (a
  // plan's probe makes both plans from one evaluation of the severity's transform)
  return (
    t: Float64Array,
    re: Float64Array,
    im: Float64Array,
    noise?: Float64Array,
    also?: { w2: number; re: Float64Array; im: Float64Array; noise: Float64Array },
    phiAbs?: Float64Array,
  ) => {
    const a = scratch("sevRe", t.length);
    const b = scratch("sevIm", t.length);
    // d: the bound on the severity transform values' absolute error (the route's own where it returns one; a plan's
    // probe, whose short run takes the per-frequency route, is charged the bound of every route the setup may take)
    let d = sev.cfAbsError;
    if (rect) {
      const dr = sev.dampedCf!(beta, t, a, b);
      if (!planning) d = Math.min(d, dr);
      count.logPgf!(a, b, re, im);
    } else {
      sev.dampedLogCf(beta, t, a, b);
      count.cgf(a, b, re, im);
    }
    // the severity's bound at each frequency where it has one (a plan's probe keeps the constant)
    const dAt = sev.cfErrorAt && !planning ? stepwise(sev.cfErrorAt, beta, t, d) : null;
    for (let k = 0; k < t.length; k++) {
      // the count's cumulant function at phi (re, im are overwritten with psi below)
      const cr = re[k];
      const ci = im[k];
      const m = Math.exp(cr);
      let r = m * Math.cos(ci);
      let i = m * Math.sin(ci);
      for (let a = 0; a < ax.length; a++) {
        if (ax[a] === 0) {
          r -= am[a];
          continue;
        }
        r -= am[a] * Math.cos(t[k] * ax[a]);
        i -= am[a] * Math.sin(t[k] * ax[a]);
      }
      // phi = fr + i fi, |phi| = ph
      let fr: number;
      let fi: number;
      let ph: number;
      if (rect) {
        fr = a[k];
        fi = b[k];
        const s2 = fr * fr + fi * fi;
        ph = s2 > 1e-290 ? Math.sqrt(s2) * (1 + 2 * EPS) : Math.hypot(fr, fi) * (1 + 2 * EPS);
      } else {
        ph = Math.exp(a[k]);
        fr = ph * Math.cos(b[k]);
        fi = ph * Math.sin(b[k]);
      }
      if (phiAbs) phiAbs[k] = ph;
      r -= sev.w * fr;
      i -= sev.w * fi;
      // an error d in phi moves P_N(phi) - p_1 phi (- p_2 phi^2) by at most E N |z|^j d (see above), or, where the
      // count bounds its slope near phi (|P_N'| far below E N where |P_N| is small), by (slope + p_1 + 2 p_2 z) d;
      // m is |P_N(phi)| within its exp's rounding; exp of the cumulant function rounds within a few eps of |cr| + |ci|
      let base = 0;
      let slope = Infinity;
      const dk = dAt ? Math.min(d, dAt[k]) : d;
      const z = ph + dk;
      if (noise) {
        const expRound = EPS * (4 + 2 * Math.abs(cr) + 2 * Math.abs(ci));
        base = 16 * EPS * (1 + pa + sev.w) + expRound * m + count.absError + 2 * count.relError * (m + pa);
        if (count.slopeNear) slope = count.slopeNear(m * (1 + expRound), dk);
      }
      if (also) {
        const v = also.w2;
        also.re[k] = r - v * (fr * fr - fi * fi);
        also.im[k] = i - v * 2 * fr * fi;
        also.noise[k] = base + 16 * EPS * v + Math.min(count.mean * (v > 0 ? z * z : z) * dk, (slope + sev.w + 2 * v * z) * dk);
      }
      if (w2 > 0) {
        r -= w2 * (fr * fr - fi * fi);
        i -= w2 * 2 * fr * fi;
      }
      re[k] = r;
      im[k] = i;
      if (noise) noise[k] = base + 16 * EPS * w2 + Math.min(count.mean * (w2 > 0 ? z * z : z) * dk, (slope + sev.w + 2 * w2 * z) * dk);
    }
  };
}
