// The bounding discretisation of a claim law with its own cdf (a per-claim layer): claims rounded down and up, their
// compounds by one FFT pair, the table between them; and the count and tail helpers it shares with ./discretise.ts.
import type { Node } from "./node";
import type { DiscretisedCompound, SeverityLaw } from "./discretise";
import { getFftPlan } from "./fftplan";
import { unwrapFrom } from "./complex";
import { cumulantEst } from "./cumulant-bounds";
import { compoundFftRound, countSlope, fftL, logRouteError, norm2 } from "./compound-fft-round";

const U = Number.EPSILON / 2;

/** The count is Poisson (its Panjer a = 0, not zero-modified). */
export const isPoissonCount = (N: Node): boolean => !!N.panjer && N.panjer.a === 0 && N.panjer.c1 === undefined && N.panjer.b > 0;

/**
 * Bennett's inequality for a compound Poisson sum of claims in [0, b] with variance v:
 * P(S - E S >= x) <= exp(-(v / b^2) ((1 + u) ln(1 + u) - u)), u = b x / v (Chernoff with
 * e^{ty} - 1 - ty <= (y/b)^2 (e^{tb} - 1 - tb) on [0, b]; Boucheron, Lugosi & Massart, Concentration Inequalities, 2.7).
 */
export function bennettTail(x: number, v: number, b: number): number {
  if (!(x > 0)) return 1;
  if (!(v > 0)) return 0;
  const u = (b * x) / v;
  return Math.exp(-(v / (b * b)) * ((1 + u) * Math.log1p(u) - u));
}


/**
 * Cell masses of the claims rounded down and rounded up onto 0, h, ..., (len-1)h, from the claim law's own cdf (sf in
 * its upper half, for relative accuracy in the tail). Atoms on a lattice point stay there in both; the mass beyond
 * the last point goes to that point when rounding down and is left out (sent to infinity) when rounding up.
 */
function boundingSeverities(sev: SeverityLaw, h: number, len: number) {
  // each value with its bound where the law gives them (cdfE, sfE); a law without them has no derived bound here
  // (every claim law that reaches this route, a per-claim layer, has them: ./layer.ts)
  let worst = 0;
  const withErr = (f: (x: number) => number, fE: ((x: number) => { v: number; e: number }) | undefined) => (x: number) => {
    if (!fE) {
      worst = Infinity;
      return f(x);
    }
    const r = fE(x);
    if (!(r.e <= worst)) worst = Math.max(worst, r.e) || Infinity;
    return r.v;
  };
  const cdf = withErr(sev.cdf!, sev.cdfE);
  const sf = withErr(sev.sf!, sev.sfE);
  const down = new Float64Array(len);
  const up = new Float64Array(len);
  const atoms = sev.atoms ?? [];
  const atomAt = (y: number) => {
    for (const a of atoms) if (Math.abs(a.x - y) <= 1e-12 * Math.max(1, Math.abs(y))) return a;
    return null;
  };
  // (cdf or sf at the point, atom included; the same without the atom)
  const right = (y: number, useCdf: boolean) => {
    const a = atomAt(y);
    const x = a ? a.x : y;
    return useCdf ? cdf(x) : sf(x);
  };
  const a0 = atomAt(0);
  let useCdf = true;
  let v0 = cdf(a0 ? a0.x : 0);
  down[0] = v0;
  up[0] = v0;
  let lost = 0;
  for (let j = 0; j + 1 < len; j++) {
    const y1 = (j + 1) * h;
    const a = atomAt(y1);
    let cell: number;
    if (useCdf) {
      const v1 = right(y1, true);
      cell = v1 - (a ? a.p : 0) - v0;
      v0 = v1;
      if (v1 > 0.5) {
        useCdf = false;
        v0 = right(y1, false);
      }
    } else {
      const v1 = right(y1, false);
      cell = v0 - v1 - (a ? a.p : 0);
      v0 = v1;
    }
    cell = Math.max(cell, 0);
    down[j] += cell;
    up[j + 1] += cell;
    if (a) {
      down[j + 1] += a.p;
      up[j + 1] += a.p;
    }
    if (!useCdf && v0 === 0) break;
  }
  lost = useCdf ? Math.max(0, 1 - v0) : v0;
  down[len - 1] += lost;
  // the computed severity cdf at each lattice point is one computed cdf (or sf) value, within the largest bound seen
  // (worst), plus the sum's rounding
  return { down, up, lost, kolmogorov: 4 * worst + 2 * len * EPS_D };
}

const EPS_D = Number.EPSILON;

/**
 * Two compounds of the same count at once: the real severities f and g ride as real and imaginary parts of one complex
 * transform (X_j = (Z_j + conj Z_{M-j})/2, Y_j = (Z_j - conj Z_{M-j})/2i), and the two real pmfs come back the same way
 * from one transform of P_N(phi_f) + i P_N(phi_g) (common practice for pairs of real sequences; Press et al.,
 * Numerical Recipes, FFT of two real functions simultaneously). Two transforms of size M instead of four.
 */
export function compoundPairByFft(N: Node, f: Float64Array, g: Float64Array, M: number): [Float64Array, Float64Array, number] {
  const plan = getFftPlan(M);
  const a = plan.a;
  const b = plan.b;
  // the rounding bound (./compound-fft-round.ts): each transform value within dZ (the pair's inputs f + i g: their
  // absolute sum at most sum f + sum g), so each severity's (Z_j + conj Z_{M-j}) / 2 and its partner within dZ too
  const nf = norm2(f);
  const ng = norm2(g);
  const dZ = fftL(M) * (nf.sum + ng.sum) * (1 + 2 * U);
  let local2 = 0;
  let out2 = 0;
  const slope = countSlope(N, Math.max(0, Math.max(nf.sum, ng.sum) - 1));
  a.fill(0);
  for (let k = 0; k < f.length; k++) a[2 * (k % M)] += f[k];
  for (let k = 0; k < g.length; k++) a[2 * (k % M) + 1] += g[k];
  plan.forward(a, b);
  const H = M / 2;
  const n = H + 1;
  // P_N(phi) + i P_N(psi) at index j and, for 0 < j < H, the same of the conjugates at M - j
  const put = (j: number, cf: number, df: number, cg: number, dg: number, e: number) => {
    a[2 * j] = cf - dg;
    a[2 * j + 1] = df + cg;
    // the two values' errors and the sum's and difference's roundings
    const ej = e + U * (Math.abs(cf) + Math.abs(dg) + Math.abs(df) + Math.abs(cg));
    const w = j > 0 && j < H ? 2 : 1;
    local2 += w * ej * ej;
    out2 += w * (a[2 * j] * a[2 * j] + a[2 * j + 1] * a[2 * j + 1]);
    if (j > 0 && j < H) {
      a[2 * (M - j)] = cf + dg;
      a[2 * (M - j) + 1] = cg - df;
    }
  };
  const pan = N.panjer;
  if (pan && pan.a === 0 && pan.c1 === undefined && pan.b > 0) {
    // Poisson: P_N(z) = exp(lambda (z - 1)) straight from phi, without its logarithm
    const lam = pan.b;
    // P_N = e^{lambda (z - 1)} is entire, |P_N'| = lambda |P_N|: within lambda |P_N(z^)| e^{lambda dZ} of the segment
    for (let j = 0; j <= H; j++) {
      const m = (M - j) % M;
      const zr = b[2 * j];
      const zi = b[2 * j + 1];
      const yr = b[2 * m];
      const yi = b[2 * m + 1];
      // phi_f(t_j) = conj((Z_j + conj Z_{M-j}) / 2), phi_g(t_j) = conj((Z_j - conj Z_{M-j}) / 2i)
      const ef = Math.exp(lam * ((zr + yr) / 2 - 1));
      const af = (-lam * (zi - yi)) / 2;
      const eg = Math.exp(lam * ((zi + yi) / 2 - 1));
      const ag = (-lam * (yr - zr)) / 2;
      // each value: the mean of the pair (u), minus 1 (u), times lambda (u), exp (2u); the angle (2u), cos and sin (2u
      // each, on the value) and the products (u): relative to the value
      const xf = (zr + yr) / 2;
      const xg = (zi + yi) / 2;
      const rf = EPS_D * (lam * (Math.abs(xf) + Math.abs(xf - 1)) + Math.abs(lam * (xf - 1)) + 2 * Math.abs(af) + 4) * 1.01;
      const rg = EPS_D * (lam * (Math.abs(xg) + Math.abs(xg - 1)) + Math.abs(lam * (xg - 1)) + 2 * Math.abs(ag) + 4) * 1.01;
      const e = (lam * Math.exp(lam * dZ) * dZ * (ef * (1 + rf) + eg * (1 + rg)) + ef * rf + eg * rg) * (1 + 4 * U);
      put(j, ef * Math.cos(af), ef * Math.sin(af), eg * Math.cos(ag), eg * Math.sin(ag), e);
    }
  } else {
    const wr = new Float64Array(2 * n);
    const wi = new Float64Array(2 * n);
    const re = new Float64Array(2 * n);
    const im = new Float64Array(2 * n);
    for (let j = 0; j <= H; j++) {
      const m = (M - j) % M;
      const zr = b[2 * j];
      const zi = b[2 * j + 1];
      const yr = b[2 * m];
      const yi = b[2 * m + 1];
      // conj phi(t_j) of each severity
      const fx = (zr + yr) / 2;
      const fy = (zi - yi) / 2;
      const gx = (zi + yi) / 2;
      const gy = (yr - zr) / 2;
      const rf = fx * fx + fy * fy;
      const rg = gx * gx + gy * gy;
      wr[j] = rf > 0 ? Math.min(0, 0.5 * Math.log(rf)) : -745;
      wi[j] = -Math.atan2(fy, fx);
      wr[n + j] = rg > 0 ? Math.min(0, 0.5 * Math.log(rg)) : -745;
      wi[n + j] = -Math.atan2(gy, gx);
    }
    unwrapFrom(wi, 0, n);
    const wig = wi.subarray(n);
    unwrapFrom(wig, 0, n);
    N.countCgf!(wr.subarray(0, n), wi.subarray(0, n), re.subarray(0, n), im.subarray(0, n));
    N.countCgf!(wr.subarray(n), wig, re.subarray(n), im.subarray(n));
    const ulps = 8 * Math.max(1, N.nodes);
    for (let j = 0; j <= H; j++) {
      const mf = Math.exp(re[j]);
      const mg = Math.exp(re[n + j]);
      const e = logRouteError(wr[j], wi[j], re[j], im[j], mf, ulps, dZ, slope, N.cgfSlope) + logRouteError(wr[n + j], wig[j], re[n + j], im[n + j], mg, ulps, dZ, slope, N.cgfSlope);
      put(j, mf * Math.cos(im[j]), mf * Math.sin(im[j]), mg * Math.cos(im[n + j]), mg * Math.sin(im[n + j]), e);
    }
  }
  plan.forward(a, b);
  const pf = new Float64Array(M);
  const pg = new Float64Array(M);
  for (let k = 0; k < M; k++) {
    pf[k] = b[2 * k] / M;
    pg[k] = b[2 * k + 1] / M;
  }
  return [pf, pg, compoundFftRound(M, local2, out2 * (1 + 4 * M * EPS_D))];
}

/** The compound of a claim law with its own cdf (a per-claim layer): the bounding pair by FFT, and their 50/50 mixture as the table. */
export function boundedCompound(N: Node, sev: SeverityLaw, h: number, K: number): DiscretisedCompound {
  const M = 2 * K;
  const len0 = K + 1;
  const { down, up, lost, kolmogorov } = boundingSeverities(sev, h, len0);
  const [pd, pu, rPair] = compoundPairByFft(N, down, up, M);
  let aliasing = 0;
  let ad = 0;
  for (let k = K; k < M; k++) {
    aliasing += Math.abs(pu[k]);
    ad += Math.abs(pd[k]);
  }
  aliasing = Math.max(aliasing, ad);
  // E N raised (and lowered, for meanLow) by its derived bound (the count's running-error cumulants)
  const nE = cumulantEst(N, 1)[0];
  const nMean = nE && Number.isFinite(nE.e) ? (nE.v + nE.e) * (1 + 2 * U) : Infinity;
  const nMeanLow = nE && Number.isFinite(nE.e) ? (nE.v - nE.e) * (1 - 2 * U) : Infinity;
  if (sev.tailIndex <= 1 && lost > 0) {
    // P(S >= x) <= E[N] P(X >= x / N) is not available in closed form here: bound P(S >= M h) <= P(N > n) + n P(X >= M h / n)
    // with n the count's 1 - 1e-12 point from its table when it has one
    const nt = N.table?.(1 << 16);
    let n = 0;
    let tail = 1;
    if (nt && nt.step === 1 && nt.origin >= 0) {
      tail = nt.tailMass;
      for (let i = nt.p.length - 1; i >= 0 && tail + nt.p[i] <= 1e-12; i--) tail += nt.p[i];
      let acc = 0;
      n = nt.origin;
      for (let i = 0; i < nt.p.length; i++) {
        acc += nt.p[i];
        n = nt.origin + i;
        if (1 - acc <= tail) break;
      }
    }
    aliasing = Math.max(aliasing, n > 0 ? Math.min(1, tail + n * sev.sf!((M * h) / n)) : 1);
  }

  let md = 0;
  let mu = 0;
  let mu2 = 0;
  for (let j = 0; j < down.length; j++) {
    md += j * down[j];
    mu += j * up[j];
    mu2 += j * j * up[j];
  }
  if (isPoissonCount(N) && lost === 0 && sev.bound !== undefined && Number.isFinite(sev.bound)) {
    // the mass that wraps round is at most P(S_up >= M h) (S_down <= S_up), bounded by Bennett's inequality: the
    // rounded-up claims stay in [0, bound + h], E S_up = lambda E X_up, Var S_up = lambda E X_up^2
    // (mu and mu2 sums of non-negative terms within gamma_n; the products a few roundings more)
    const v = nMean * mu2 * h * h * (1 + 4 * EPS_D * up.length);
    aliasing = Math.max(aliasing, bennettTail(M * h - nMean * mu * h * (1 + 4 * EPS_D * up.length), v, sev.bound + h));
  }
  // the rounding (./compound-fft-round.ts): each bounding compound's first K entries within sqrt(K) ||d(pd + i pu)||_2 in
  // sum, the table (their clipped mean) within the same, and the running sums of K terms within gamma_K of 1 + that
  const gK = (K * EPS_D) / (2 - K * EPS_D);
  const round = (2 * Math.sqrt(K) * rPair + 4 * gK * (1 + Math.sqrt(K) * rPair)) * (1 + 4 * EPS_D);
  const slack = 2 * aliasing + nMean * (lost + kolmogorov) + round;
  let cd = 0;
  let cu = 0;
  let half = 0;
  const out = new Float64Array(K);
  let kept = 0;
  for (let k = 0; k < K; k++) {
    out[k] = Math.max(0, (pd[k] + pu[k]) / 2);
    kept += out[k];
    cd += pd[k];
    cu += pu[k];
    half = Math.max(half, (cd - cu) / 2);
  }
  const meanE = sev.meanE;
  const meanLow = Number.isFinite(nMeanLow) ? nMeanLow * md * h * (1 - 4 * EPS_D * down.length) : null;
  const meanHigh = !Number.isFinite(nMean)
    ? null
    : lost === 0
      ? nMean * mu * h * (1 + 4 * EPS_D * up.length)
      : sev.tailMean && Number.isFinite(sev.tailMean(0))
        ? // X_up <= X + h: below the last point the rounded-up cells exactly, beyond it E[X; X > R] (tailMean: an upper
          // bound) + h P(X > R)
          nMean * (mu * h * (1 + 4 * EPS_D * up.length) + sev.tailMean((len0 - 1) * h) + h * lost) * (1 + 4 * EPS_D)
        : meanE && Number.isFinite(meanE.e)
          ? // E X_up <= E X + h, E X within its derived bound (the claim law's layer moment, ./layer.ts)
            nMean * (meanE.v + meanE.e + h) * (1 + 4 * EPS_D)
          : null;
  return {
    table: { origin: 0, step: h, p: out, tailMass: Math.max(0, 1 - kept) },
    cdfError: half + slack,
    bracket: half,
    aliasing,
    span: h,
    points: K,
    bounds: { step: h, down: pd.subarray(0, K), up: pu.subarray(0, K), meanLow, meanHigh, slack },
  };
}
