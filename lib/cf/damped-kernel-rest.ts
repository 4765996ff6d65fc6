// Derived bounds on a sum's damped transform less its gamma kernels, seeing the kernels cancel the gamma terms' leading powers.
import type { GammaKernel } from "./damped-kernels";
import { gammaMonomial, type GammaMonomial } from "./damped-kernel-monomials";

const EPS = Number.EPSILON;
/** exponents within this of E + n are the kernel matching that power (as the series' own merge, ./damped-kernels.ts) */
const SAME = 1e-9;
/** the binomial series in 1/z is used where max |d_i| / |z| is at most this (its tail then falls geometrically) */
const RADIUS = 0.5;
/** the series' terms past the kernels' order bounded one by one (see N) */
const EXTRA = 2;
/** the power a near kernel's exponent residual gives up past the last probe (see decay) */
const NEAR_EPS = 1 / 32;

/** the pieces of a child's bounds the remainder needs (a DampedMajorant of ./damped-majorant.ts) */
export interface ChildBounds {
  atom: number;
  rest(beta: number, t: number): number;
  slope(beta: number, t: number): number;
  /** an exact gamma(shape, rate) term from its lower end: its transform is (rate / (rate + s))^shape */
  gamma?: { shape: number; rate: number };
  /** a compound of exact gamma(shape, rate) claims (see Claims) */
  claims?: Claims;
}

/**
 * A compound of gamma(shape, rate) claims: its transform is sum_n p_n phi^n, phi = (rate / (rate + s))^shape, the count's
 * p_0 .. p_M (p[0] the atom) each within pErr, and `mean` at least E N (so sum_{n > M} p_n <= 1 - sum_{n <= M} p_n and
 * sum_{n > M} n p_n <= mean - sum_{n <= M} n p_n, the p_n taken at their least)
 */
export interface Claims {
  shape: number;
  rate: number;
  p: Float64Array;
  pErr: Float64Array;
  mean: number;
}

/** bounds on |psi - atom - kernels| and its derivative at every frequency from t on, and a power past t0 */
export interface KernelRest {
  kernels: readonly GammaKernel[];
  /** the bounds on |psi - atom - kernels| (rest) and on its derivative (slope) from t on; Infinity where not derived */
  at(beta: number, t: number): { rest: number; slope: number };
  decay(beta: number, t0: number): { R: number; q: number };
}

const up = (v: number, k = 8) => v * (1 + k * EPS);
/** at most this many products of gamma transforms (the claims' orders are lowered until the count fits) */
const MAX_MONOMIALS = 256;
/**
 * An independent sum of exact gamma terms G_i = (rho_i / (rho_i + s))^{k_i} (s = beta - i t), compounds of exact gamma
 * claims and other terms a_j + R_j (atom a_j at their lower end, |R_j| and |R_j'| bounded through the operators), its
 * transform past lo psi = G P, G = prod G_i, P = prod_j (Q_j + R_j'), less its gamma kernels K (one rate r, at lo or above it, each then bounded by its size: the
 * endpoint expansion's terms up to its order, ./kernel-carry.ts). A compound of gamma(k_j, rho_j) claims is written
 * Q_j = sum_{n <= M_j} p_n Gamma_j^n (Gamma_j = (rho_j / (rho_j + s))^{k_j}, exact) and R_j' = sum_{n > M_j} p_n Gamma_j^n,
 * |R_j'| <= (sum_{n > M} p_n) m^{M + 1} and |R_j''| <= (sum_{n > M} n p_n) m^M |Gamma_j'| (m >= |Gamma_j|, every p_n >= 0);
 * another term is Q_j = a_j, R_j' = R_j. Then
 *   psi - K = G (P - prod Q) + (G prod Q - K),
 * |P - prod Q| <= sum_j (prod_{l < j} |Q_l|) |R_j'| prod_{l > j} (|Q_l| + |R_l'|) (telescoped, no cancellation), its
 * derivative by the product rule over the same terms. G prod Q is a sum of products of gamma transforms (monomials, each
 * its coefficient times G and one Gamma_j^{n_j} per compound), each a series in z = r + s (./damped-kernel-monomials.ts:
 * sum_n v_n z^{-(E_m + n)} up to N_m, the rest within AC_m |z|^{-E_m} T_m(1/|z|)). The terms of one power e (within SAME)
 * and the kernel w (r / z)^e = w r^e z^{-e} of that power are summed to c_e (the kernels cancel them up to c_e), each term's
 * own power e' off e by at most `off` (the shapes' sums rounded) leaving v (z^{-e'} - z^{-e}), |.| <= |v| |z|^{-e}
 * (e^{off (|ln |z|| + pi / 2)} - 1) (|arg z| < pi / 2: Re z = r + beta > 0); kernels of no such power are bounded by their
 * size |w| (r / |z|)^e. Every term is non-increasing in t (|z| = |r + beta - i t| grows with t). The derivative in t is
 * -i d/dz: |c_e| e |z|^{-e - 1}, AC |z|^{-E} (E x T(x) + x^2 T'(x)) (x = 1/|z|) and |w| e r^e |z|^{-e - 1}; and
 * |(G (P - prod Q))'| <= |G| sum_i k_i / |rho_i + s| |P - prod Q| + |G| |(P - prod Q)'|. Where |z| is too small for the
 * series the caller's bounds stay (the operators' size plus the kernels' own sizes). Undefined where the sum has no gamma
 * term, its kernels are not of one rate at lo, or a value is not finite.
 */
export function sumKernelRest(cs: readonly ChildBounds[], kernels: readonly GammaKernel[] | undefined, lo: number): KernelRest | undefined {
  if (!kernels || kernels.length === 0) return undefined;
  const gs = cs.filter((c) => c.gamma).map((c) => c.gamma!);
  if (gs.length === 0) return undefined;
  const r = kernels[0].rate;
  // kernels above lo (a compound of pareto claims: its jumps at n xm, each times the sum's other terms) meet no monomial
  // at lo: each is bounded by its size below (`others`)
  if (!kernels.every((k) => k.rate === r && k.at >= lo && k.at < Infinity) || !(r > 0) || !Number.isFinite(r)) return undefined;
  const E = gs.reduce((s, g) => s + g.shape, 0);
  const order = Math.max(...kernels.map((k) => k.shape));
  // EXTRA orders past the kernels' own: their terms are bounded by their size, not by the majorant series, which sees no
  // cancellation (at the kernels' rate the shape-weighted mean of the rho_i, b_1 = sum k_i d_i = 0)
  const top = order + EXTRA;
  // each compound of gamma claims to the count M with E + (M + 1) k past top (what is left, G R', then falls faster than
  // every power kept), at most its table; lowered while the monomials are too many
  const os = cs.filter((c) => !c.gamma);
  const Ms = os.map((c) => (c.claims ? Math.min(c.claims.p.length - 1, Math.max(0, Math.floor((top - E) / c.claims.shape))) : 0));
  const count = () => Ms.reduce((s, M) => s * (M + 1), 1);
  while (count() > MAX_MONOMIALS) {
    const j = Ms.indexOf(Math.max(...Ms));
    Ms[j]--;
  }
  // per other term: |Q| (q), |Q'| (dq), |R'| (rr), |R''| (dr) at (beta, t)
  const tailSums = os.map((c, j) => {
    const cl = c.claims;
    const M = Ms[j];
    if (!cl || M === 0) return null;
    let p = 0;
    let np = 0;
    for (let n = 0; n <= M; n++) {
      const lowP = Math.max(0, cl.p[n] - cl.pErr[n]);
      p += lowP;
      np += n * lowP;
    }
    return { P: up(Math.max(0, 1 - p * (1 - 4 * (M + 1) * EPS)), 4), NP: up(Math.max(0, cl.mean - np * (1 - 4 * (M + 1) * EPS)), 4) };
  });
  // (into arrays kept with the bound, not an object per term and frequency: restO runs at every probe frequency)
  const pq = new Float64Array(os.length);
  const pdq = new Float64Array(os.length);
  const prr = new Float64Array(os.length);
  const pdr = new Float64Array(os.length);
  const put = (j: number, v: { q: number; dq: number; rr: number; dr: number }) => {
    pq[j] = v.q;
    pdq[j] = v.dq;
    prr[j] = v.rr;
    pdr[j] = v.dr;
  };
  const parts = (beta: number, t: number) => {
    for (let j = 0; j < os.length; j++) put(j, part(beta, t, j));
    return { q: pq, dq: pdq, rr: prr, dr: pdr };
  };
  const part = (beta: number, t: number, j: number) => {
      const c = os[j];
      const cl = c.claims;
      const M = Ms[j];
      const ts = tailSums[j];
      if (!cl || !ts) return { q: c.atom, dq: 0, rr: c.rest(beta, t), dr: c.slope(beta, t) };
      const h = Math.hypot(cl.rate + beta, t);
      const m = Math.min(1, up(Math.pow(cl.rate / h, cl.shape), 16));
      const dm = up((cl.shape * m) / h, 4);
      let q = 0;
      let dq = 0;
      // mp = m^{n - 1}, mn = m^n
      let mp = 0;
      let mn = 1;
      for (let n = 0; n <= M; n++) {
        const pn = cl.p[n] + cl.pErr[n];
        q += pn * mn;
        if (n > 0) dq += n * pn * mp * dm;
        mp = mn;
        mn *= m;
      }
      // now mp = m^M, mn = m^{M + 1}
      return { q: up(q, 2 * M + 8), dq: up(dq, 2 * M + 8), rr: up(ts.P * mn, 4), dr: up(ts.NP * mp * dm, 8) };
  };
  // |P - prod Q| and its derivative: sum_j (prod_{l < j} Q_l) R_j' (prod_{l > j} (Q_l + R_l')), each term by the product rule
  const restO = (beta: number, t: number, withSlope = true) => {
    const { q, dq, rr, dr } = parts(beta, t);
    const n = os.length;
    let rest = 0;
    let slope = 0;
    for (let j = 0; j < n; j++) {
      let a = rr[j];
      for (let l = 0; l < j; l++) a *= q[l];
      for (let l = j + 1; l < n; l++) a *= q[l] + rr[l];
      rest += a;
      if (!withSlope) continue;
      // the derivative falls on R_j', on one Q_i before j or on one factor after j
      let d = dr[j];
      for (let l = 0; l < j; l++) d *= q[l];
      for (let l = j + 1; l < n; l++) d *= q[l] + rr[l];
      for (let i = 0; i < n; i++) {
        if (i === j) continue;
        let e = rr[j] * (i < j ? dq[i] : dq[i] + dr[i]);
        for (let l = 0; l < j; l++) if (l !== i) e *= q[l];
        for (let l = j + 1; l < n; l++) if (l !== i) e *= q[l] + rr[l];
        d += e;
      }
      slope += d;
    }
    const g = 1 + 4 * (n * n + 2) * EPS;
    return { rest: rest * g, slope: slope * g };
  };
  // the monomials of G prod Q: one per choice of n_j <= M_j (n_j = 0: the atom), coefficient prod p_{n_j} (p_0 = the atom)
  const monos: GammaMonomial[] = [];
  const idx = new Array<number>(os.length).fill(0);
  for (;;) {
    let coef = 1;
    let rel = 0;
    const fs = [...gs];
    for (let j = 0; j < os.length; j++) {
      const cl = os[j].claims;
      if (!cl || Ms[j] === 0) {
        coef *= os[j].atom;
        continue;
      }
      const n = idx[j];
      coef *= cl.p[n];
      rel += cl.p[n] > 0 ? cl.pErr[n] / cl.p[n] : 0;
      if (n > 0) fs.push({ shape: n * cl.shape, rate: cl.rate });
    }
    if (coef !== 0) {
      const Em = fs.reduce((s, f) => s + f.shape, 0);
      monos.push(gammaMonomial(fs, coef, rel + 4 * (os.length + 1) * EPS, r, Math.floor(top - Em + SAME)));
    }
    let j = 0;
    while (j < os.length && idx[j] === Ms[j]) idx[j++] = 0;
    if (j === os.length) break;
    idx[j]++;
  }
  // the terms by power: c_e, its error, and each term's distance from e (near)
  const groups: { e: number; c: number; err: number; abs: number; n: number }[] = [];
  // (each near term's group by index too: x^g is formed once per group and frequency, the same value for its terms)
  const near: { g: number; gi: number; v: number; off: number }[] = [];
  const groupOf = (e: number) => {
    let g = groups.find((x) => Math.abs(x.e - e) <= SAME);
    if (!g) groups.push((g = { e, c: 0, err: 0, abs: 0, n: 0 }));
    return g;
  };
  for (const m of monos)
    for (let n = 0; n < m.v.length; n++) {
      const e = m.E + n;
      const g = groupOf(e);
      g.c += m.v[n];
      g.err += m.err[n];
      g.abs += Math.abs(m.v[n]);
      g.n++;
      near.push({ g: g.e, gi: groups.indexOf(g), v: Math.abs(m.v[n]) * (1 + 4 * EPS), off: Math.abs(e - g.e) + m.dE + 4 * (n + 1) * EPS * e });
    }
  const others: GammaKernel[] = [];
  for (const k of kernels) {
    const wr = k.w * Math.pow(r, k.shape);
    const g = k.at === lo ? groups.find((x) => Math.abs(x.e - k.shape) <= SAME) : undefined;
    if (g) {
      g.c -= wr;
      g.err += Math.abs(wr) * 16 * EPS;
      g.abs += Math.abs(wr);
      g.n++;
      near.push({ g: g.e, gi: groups.indexOf(g), v: Math.abs(wr) * (1 + 16 * EPS), off: Math.abs(k.shape - g.e) + 4 * EPS * k.shape });
    } else others.push(k);
  }
  // c_e as summed within (n + 1) eps of the sum of its terms' sizes (Higham, Accuracy and Stability, sec. 4.2)
  const cAbs = groups.map((g) => ({ e: g.e, c: up(Math.abs(g.c) + g.err + (g.n + 1) * EPS * g.abs, 4) }));
  const dMax = Math.max(0, ...monos.map((m) => m.dMax), ...gs.map((g) => Math.abs(r - g.rate)));
  const nTerms = monos.length + groups.length + near.length + others.length;
  if (![...cAbs.map((c) => c.c), ...near.map((v) => v.v), ...monos.map((m) => m.AC)].every(Number.isFinite)) return undefined;
  // |G| and sum k_i / |rho_i + s|
  const gamma = (beta: number, t: number) => {
    let lg = 0;
    let kr = 0;
    for (const g of gs) {
      const m = Math.hypot(g.rate + beta, t);
      lg += g.shape * Math.log(g.rate / m);
      kr += g.shape / m;
    }
    return { G: Math.exp(lg) * (1 + (8 + 4 * gs.length + 2 * Math.abs(lg)) * EPS), kr: up(kr, 4 * gs.length) };
  };
  const pw = (x: number, e: number) => Math.pow(x, e) * (1 + (4 + 2 * e) * EPS);
  // x^e of each group's power at the frequency in hand (cAbs[i].e is groups[i].e)
  const xg = new Float64Array(groups.length);
  const bound = (beta: number, t: number) => {
    const zAbs = Math.hypot(r + beta, t) * (1 - 2 * EPS);
    const x = 1 / zAbs;
    if (!(dMax * x <= RADIUS)) return { rest: Infinity, slope: Infinity };
    const { G, kr } = gamma(beta, t);
    const o = restO(beta, t);
    const lnz = Math.abs(Math.log(x)) + 1e-15;
    let rest = G * o.rest;
    let slope = G * (kr * o.rest + o.slope);
    for (const m of monos) {
      const { T, T1 } = m.tails(x);
      const zE = pw(x, m.E) * Math.exp(m.dE * lnz);
      rest += m.AC * zE * T;
      slope += m.AC * zE * ((m.E + m.dE) * x * T + x * x * T1);
    }
    for (let i = 0; i < cAbs.length; i++) {
      const c = cAbs[i];
      xg[i] = pw(x, c.e);
      const v = c.c * xg[i];
      rest += v;
      slope += v * c.e * x;
    }
    for (const v of near) {
      // the derivative: v z^{-g-1} (g (z^delta - 1) - delta) with |delta| <= off
      const zr = v.v * xg[v.gi];
      const mm = Math.expm1(v.off * (lnz + Math.PI / 2)) * (1 + 4 * EPS);
      rest += zr * mm;
      slope += zr * x * ((v.g + v.off) * mm + v.off);
    }
    // a kernel w e^{-s d} (r / z)^e, d = at - lo: |.| = |w| e^{-beta d} (r / |z|)^e, its t-derivative (-i d/ds) within
    // that times d + e / |z|
    for (const k of others) {
      const d = (k.at - lo) * (1 + 2 * EPS);
      const v = Math.abs(k.w) * Math.pow(r * x, k.shape) * Math.exp(-beta * (k.at - lo) * (1 - 2 * EPS)) * (1 + 24 * EPS);
      rest += v;
      slope += v * (k.shape * x + d);
    }
    return { rest: up(rest, 16 + 2 * nTerms), slope: up(slope, 16 + 2 * nTerms) };
  };
  return {
    kernels,
    at: bound,
    // every term above is at most its value with t for |z| (|z| >= t) and non-increasing, each a power E or more of 1/t
    // times a non-increasing factor: past t0 at most its value at t0 (with t0 for |z|) times (t0 / t)^E
    decay: (beta, t0) => {
      const x = 1 / t0;
      // t^{-E} for the exact E within t^{-(E - dE)} needs t >= 1
      if (!(dMax * x <= RADIUS) || !(t0 > 1)) return { R: Infinity, q: 0 };
      const { G } = gamma(beta, t0);
      const Gt = gs.reduce((s, g) => s * Math.pow(g.rate * x, g.shape), 1) * (1 + (8 + 8 * gs.length) * EPS);
      const o = restO(beta, t0, false);
      const lnz = Math.abs(Math.log(x)) + 1e-15;
      let R = Math.max(G, Gt) * o.rest;
      let q = E - 4 * gs.length * EPS * E;
      for (const m of monos) {
        R += m.AC * pw(x, m.E) * Math.exp(m.dE * lnz) * m.tails(x).T;
        q = Math.min(q, m.E - m.dE);
      }
      for (const c of cAbs) R += c.c * pw(x, c.e);
      // |z^{-delta} - 1| <= e^y - 1 <= y e^y, y = off (ln |z| + pi / 2), with ln |z| <= ln t0 + c0 + ln u (u = t / t0 >= 1,
      // |z| <= t + r + beta, c0 = ln(1 + (r + beta) / t0)) and ln u <= u^NEAR_EPS / NEAR_EPS: at most
      // e^{Y0} (Y0 + off / NEAR_EPS) u^{off + NEAR_EPS}, Y0 = off (ln t0 + c0 + pi / 2), so a power off + NEAR_EPS less than g
      const c0 = Math.log1p((r + beta) / t0);
      for (const v of near) {
        const Y0 = v.off * (Math.log(t0) + c0 + Math.PI / 2);
        R += v.v * pw(x, v.g) * Math.exp(Y0) * (Y0 + v.off / NEAR_EPS) * (1 + 16 * EPS);
        q = Math.min(q, v.g - v.off - NEAR_EPS);
      }
      for (const k of others) {
        R += Math.abs(k.w) * Math.pow(r * x, k.shape) * Math.exp(-beta * (k.at - lo) * (1 - 2 * EPS)) * (1 + 24 * EPS);
        q = Math.min(q, k.shape);
      }
      return { R: up(R, 16 + 2 * nTerms), q };
    },
  };
}
