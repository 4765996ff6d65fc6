/**
 * The derived remainder of the layer's Filon rule (./filon.ts) on one panel [m - h, m + h]: f is interpolated at the M
 * nodes u_k = m + h xi_k. With f analytic on the disc |z - m| <= R (R > h) and |f| <= K there, Hermite's formula on the
 * circle |z - m| = R (Davis, Interpolation and Approximation, thm. 3.6.1; Trefethen, Approximation Theory and
 * Approximation Practice, thm. 11.1), f(u) - p(u) = (1 / 2 pi i) oint omega(u) f(z) / (omega(z) (z - u)) dz, omega(u) =
 * prod (u - u_k), gives |f - p| <= K R / (R - h) sup|omega| / min|omega(z)|, with sup over the panel |omega| = h^M sup
 * |prod (x - xi_k)| and |omega(z)| >= prod (R - h |xi_k|) on the circle. At the Gauss-Legendre nodes prod (x - x_k) =
 * P_M(x) / k_M, |P_M| <= 1 on [-1, 1] (Szego 7.21), k_M = (2M)! / (2^M M!^2) (A&S 22.3.8); nodes within e of them move
 * the product by at most (2 + e)^M - 2^M (each factor |x - xi_k| <= |x - x_k| + e, |x - x_k| <= 2) and |xi_k| by e. Cauchy's
 * estimate on the disc of radius R - h about each point of the panel gives |f'| <= K / (R - h). Least over a few R.
 * Over the panel int |f - p| <= (the same factor) h int_{-1}^{1} |prod (x - xi_k)| dx, and int |P_M| <= (2 int P_M^2)^(1/2) =
 * 2 / sqrt(2M + 1) (Cauchy-Schwarz; A&S 22.2.10), the nodes' move adding 2 ((2 + e)^M - 2^M).
 */
import { binom, dyadic } from "./gl-enclosure";

/** 1 / k_M for the M-node rule: 2^M M!^2 / (2M)! */
function invLead(M: number): number {
  let r = 1;
  for (let j = 1; j <= M; j++) r *= (2 * j) / (M + j);
  // r = prod 2 j / (M + j) = 2^M M! / ((2M)! / M!) exactly in real arithmetic; a few ulps per factor
  return r * (1 + 4 * M * Number.EPSILON);
}

const RHOS = [0.125, 0.25, 0.375, 0.5, 0.625, 0.75, 0.875, 1, 1.25, 1.5, 1.75, 2, 2.5, 3, 3.5, 4, 5, 6, 8, 10, 12, 16, 24, 32, 64];

export interface PanelRemainder {
  /** sup over the panel of |f - p^|, p^ the exact interpolant at the nodes as placed */
  sup: number;
  /** int over the panel of |f - p^| */
  l1: number;
  /** a bound on |f'| over the panel (K / (rho h), least over the discs) */
  slope: number;
  /** a bound on |f| over the panel */
  fmax: number;
}

/**
 * `logK(m, R)`: log of an upper bound on |f| over |z - m| <= R (Infinity where f is not analytic there); e bounds the
 * nodes' distance (in x) from the true Gauss-Legendre nodes x_k (|x_k| in absX). Infinite bounds where no disc fits.
 */
export function panelRemainder(logK: (m: number, R: number) => number, m: number, h: number, M: number, e: number, absX: Float64Array): PanelRemainder {
  const moved = (Math.pow(2 + e, M) - Math.pow(2, M)) * (1 + 1e-12);
  const W = invLead(M) + moved;
  const W1 = ((invLead(M) * 2) / Math.sqrt(2 * M + 1)) * (1 + 1e-15) + 2 * moved;
  let best = Infinity;
  let l1 = Infinity;
  let slope = Infinity;
  let fmax = Infinity;
  for (const rho of RHOS) {
    const R = h * (1 + rho);
    const lk = logK(m, R * (1 + 2 * Number.EPSILON));
    if (!(lk < Infinity)) continue;
    // log of R / (R - h) prod h / (R - h |xi_k|), each factor's rounding a few ulps
    let lp = Math.log((1 + rho) / rho);
    for (let k = 0; k < M; k++) lp -= Math.log(1 + rho - (absX[k] + e));
    const v = Math.exp(lk + lp) * (1 + 1e-12);
    best = Math.min(best, v * W);
    l1 = Math.min(l1, v * W1 * h);
    slope = Math.min(slope, (Math.exp(lk) / (rho * h)) * (1 + 1e-12));
    fmax = Math.min(fmax, Math.exp(lk));
  }
  return { sup: best, l1, slope, fmax };
}

/** num / 2^E rounded up (num >= 0) */
function upper(num: bigint, E: number): number {
  const sh = Math.max(0, E - 1000);
  const n = sh > 0 ? (num >> BigInt(sh)) + 1n : num;
  return Number(n) * (1 + 2 ** -50) * 2 ** -(E - sh);
}

/**
 * max_k |table[n M + k] - P_n(x[k])| for each n < M, exactly: P_n at the dyadic x = m / 2^D from 2^n P_n(z) = sum_k
 * (-1)^k C(n, k) C(2n - 2k, n) z^{n - 2k} (A&S 22.3.8) in integers, against the table's own dyadic value.
 */
export function legendreTableError(x: Float64Array, table: Float64Array, M: number): Float64Array {
  const err = new Float64Array(M);
  for (let n = 0; n < M; n++) {
    const c: bigint[] = new Array(n + 1).fill(0n);
    for (let k = 0; 2 * k <= n; k++) c[n - 2 * k] = (k % 2 ? -1n : 1n) * binom(n, k) * binom(2 * n - 2 * k, n);
    for (let k = 0; k < M; k++) {
      const xk = dyadic(x[k]);
      const m = xk.m;
      const D = Number(xk.d);
      // S = sum_j c_j m^j 2^{D (n - j)} = 2^{n + D n} P_n(x)
      let S = 0n;
      for (let j = n; j >= 0; j--) S = S * m + c[j] * (1n << BigInt(D * (n - j)));
      const tk = dyadic(table[n * M + k]);
      const t = { m: tk.m, D: Number(tk.d) };
      const E = n + D * n;
      let diff = t.m * (1n << BigInt(E)) - S * (1n << BigInt(t.D));
      if (diff < 0n) diff = -diff;
      err[n] = Math.max(err[n], upper(diff, E + t.D));
    }
  }
  return err;
}
