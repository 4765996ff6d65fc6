// Node.logRoundSlope / logRoundAt of laws whose log-CF is taken on the principal branch at each frequency, with no unwrap
// (beta and PERT, truncated normal, a per-claim layer): no grid enters, so the argument's size is bounded outright. See
// ./log-round.ts for the rounding model (8 ulps of |L|, so 8 u |phi| |L|) and ../compound-errors.ts for its use.
import type { Node } from "../node";
import { lgamma, lgammaErr } from "./special";

const EPS = Number.EPSILON;
const U8 = 8 * EPS;

/**
 * A law whose computed log is log |psi(t)| + i (Arg psi(t) + a t) at each frequency, psi(t) = e^{-i a t} phi(t) =
 * E e^{i t (X - a)}, Arg the principal argument (atan2, no unwrap), m >= E|X - a|: |1 - psi(t)| <= m |t| (|e^{iy} - 1| <=
 * |y|), so |psi| |log |psi|| <= min(1/e, m |t|) (x |log x| <= 1 - x on [0, 1]) and |Arg psi| <= pi min(1, m |t|) (|1 - w| =
 * r < 1 gives |arg w| <= asin r <= pi r / 2; pi always), and with |phi| <= 1,
 * |phi| |L| <= min(1/e, m |t|) + pi min(1, m |t|) + |a| |t| <= ((1 + pi) m + |a|) |t|: R = 8 u ((1 + pi) m + |a|). The
 * computed Im L rounds within 3 u |Arg| (atan2, the sum) plus 2 u |a t| (the product a t, the sum), inside those 8 ulps.
 * `tv`: the total variation of the density (extended by 0 off the support; 2 f_max for a unimodal one), where derived:
 * by parts |phi(t)| <= tv / |t| =: M (Lukacs, Characteristic Functions, 2nd ed., sec. 2.3, for a density of bounded
 * variation), so per frequency |phi| |L| <= min(1/e, m |t|, M |log M| where M <= 1/e) + pi min(M, m |t|) + M |a| |t|.
 * Unlike ./log-round.ts ggcLogRound this assumes nothing about the grid: the node carries no logRoundNote.
 */
export function principalLogRound(m: number, a: number, tv = Infinity): Pick<Node, "logRoundSlope" | "logRoundAt"> {
  if (!(m >= 0 && Number.isFinite(m) && Number.isFinite(a))) return {};
  const mm = m * (1 + 4 * EPS);
  const aa = Math.abs(a);
  const slope = U8 * ((1 + Math.PI) * mm + aa) * (1 + 16 * EPS);
  const tvu = tv * (1 + 4 * EPS);
  return {
    logRoundSlope: slope,
    logRoundAt: (t: number) => {
      const s = Math.abs(t);
      const ms = mm * s;
      const M = Math.min(1, tvu / s);
      const re = Math.min(1 / Math.E, ms, M <= 1 / Math.E ? -M * Math.log(M) * (1 + 4 * EPS) : Infinity);
      return Math.min(slope * s, U8 * (re + Math.PI * Math.min(M, ms) + M * aa * s) * (1 + 16 * EPS));
    },
  };
}

/**
 * 2 f_max of the beta(alpha, beta) law on [a, a + w] with alpha, beta >= 1 (unimodal, 0 off [a, a + w] past its jumps):
 * f_max = y*^{alpha - 1} (1 - y*)^{beta - 1} / (B(alpha, beta) w), y* = (alpha - 1) / (alpha + beta - 2) (y* = 0 or 1 where a
 * shape is 1), through lgamma within lgammaErr and a relative 1e-12 for the logs' roundings and for y*'s (f' = 0 there, so
 * its move is second order); Infinity for shapes below 1 (the density is unbounded).
 */
export function betaDensityVariation(alpha: number, beta: number, w: number): number {
  if (!(alpha >= 1 && beta >= 1 && w > 0)) return Infinity;
  const y = alpha + beta > 2 ? (alpha - 1) / (alpha + beta - 2) : 0.5;
  const lb = lgamma(alpha) + lgamma(beta) - lgamma(alpha + beta);
  const err = lgammaErr(alpha) + lgammaErr(beta) + lgammaErr(alpha + beta);
  const lx = (alpha > 1 ? (alpha - 1) * Math.log(y) : 0) + (beta > 1 ? (beta - 1) * Math.log1p(-y) : 0);
  const v = Math.exp(lx - lb + err + 1e-12 * (1 + Math.abs(lx) + Math.abs(lb))) / w;
  return Number.isFinite(v) ? 2 * v * (1 + 8 * EPS) : Infinity;
}
