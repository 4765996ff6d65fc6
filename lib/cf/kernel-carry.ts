import type { Node } from "./node";
import { scaledSeverityKernel } from "./severity-kernel-scale";
import { kernelsOfSeries, mixSeries, productSeries, scaleSeries, seriesOfExpansion, shiftSeries, type TransformSeries } from "./damped-kernels";

/**
 * Gamma kernels through the operators: a compound whose transform decays slowly (pareto, weibull, lomax, burr
 * severities) keeps its kernels when it is scaled or shifted (a gamma kernel moves to a gamma kernel: aX has rate / a,
 * X + b starts at + b), and inside an independent sum or a mixture the kernels are rebuilt from the whole law's
 * endpoint expansion (the children's series multiplied or mixed), so the damped inversion of the sum sees a transform
 * that decays fast again. Only where every child's expansion is known; otherwise the node has no kernels.
 */
export function seriesOf(n: Node): TransformSeries | undefined {
  if (n.transformSeries) return n.transformSeries;
  if (n.laplaceExpansion && n.kind.type === "continuous") return seriesOfExpansion(n.laplaceExpansion);
  return undefined;
}

function rebuild(node: Node, cs: Node[], series: TransformSeries | undefined, sum = false) {
  if (!series) return;
  node.transformSeries = series;
  const rates = cs.flatMap((c) => (c.dampedKernels && c.dampedKernels.cf === c.dampedLogCf ? [c.dampedKernels.rate] : []));
  if (!node.dampedLogCf) return;
  // no child with kernels of its own (e.g. a gamma term beside a compound's atom): the smallest child scale, so that
  // the kernels' rate is near the terms' own (a far rate makes large kernel weights of opposite signs)
  let rate = rates.length ? Math.min(...rates) : 1 / Math.max(Math.min(...cs.map((c) => c.scale)), 1e-300);
  // a sum whose expansion (to the kernels' order) is its exact gamma(k_i, rho_i) terms' product times the other terms' atoms
  // alone, A C s^{-E}: that product is C (r + s)^{-E} (1 + sum k_i (r - rho_i) / (r + s) + ...), so at the shape-weighted
  // mean rate r = sum k_i rho_i / E the one kernel leaves no (r + s)^{-(E + 1)} term and what is left falls a power faster
  // (./damped-kernel-rest.ts bounds it with that term's coefficient). Seed 1 model 8 of the random bench: min(rates) 0.132
  // gave a kernel of weight 622 and a remainder ~ t^-5. Where other terms' claims enter the expansion too (seed 2 model 10,
  // a gamma term times exponential claims), their rates count as well and the rule below is kept
  const gs = sum ? sumGammaTerms(cs) : [];
  const E = gs.reduce((s, g) => s + g.shape, 0);
  const powers = series.flatMap((b) => [...b.series].filter(([e, c]) => e > 1e-9 && c !== 0).map(([e]) => e));
  if (gs.length > 0 && powers.length === 1 && Math.abs(powers[0] - E) <= 1e-9 * Math.max(1, E))
    rate = gs.reduce((s, g) => s + g.shape * g.rate, 0) / E;
  const kernels = kernelsOfSeries(series, rate);
  if (kernels.length > 0) node.dampedKernels = { cf: node.dampedLogCf, kernels, rate };
}

/** the exact gamma terms of a sum (as its damped majorant sees them), for the kernels' rate */
function sumGammaTerms(cs: Node[]): { shape: number; rate: number }[] {
  return cs.flatMap((c) => (c.dampedMajorant?.gamma && c.dampedMajorant.cf === c.dampedLogCf ? [c.dampedMajorant.gamma] : []));
}

export function carrySumKernels(node: Node, cs: Node[]) {
  const ss = cs.map(seriesOf);
  if (ss.some((s) => !s)) return;
  rebuild(node, cs, ss.reduce((a, b) => productSeries(a!, b!)), true);
}

export function carryMixKernels(node: Node, ws: number[], cs: Node[]) {
  const ss = cs.map(seriesOf);
  if (ss.some((s) => !s)) return;
  rebuild(node, cs, mixSeries(ws, ss as TransformSeries[]));
}

export function carryScaleKernels(node: Node, a: number, c: Node) {
  if (!(a > 0)) return;
  const s = seriesOf(c);
  if (s) node.transformSeries = scaleSeries(a, s);
  const k = c.dampedKernels;
  if (k && k.cf === c.dampedLogCf && node.dampedLogCf)
    node.dampedKernels = { cf: node.dampedLogCf, kernels: k.kernels.map((x) => ({ ...x, at: a * x.at, rate: x.rate / a })), rate: k.rate / a };
  // the remainder after the kernels is the child's at (a beta, a t): its derived bound, non-increasing in t, is taken at
  // a t (1 - eps), below the rounded argument the values are computed at (a gamma compound's, ./compound.ts)
  const r = c.dampedRemainder;
  if (r && r.cf === c.dampedLogCf && node.dampedLogCf && node.dampedKernels) {
    const j = r.jump;
    // the slow rest's function is the child's at y / a, over a (its damping a beta): its total variation over a
    const jump = j && {
      fast: (beta: number, t: number) => j.fast(a * beta, a * t * (1 - Number.EPSILON)),
      get decay() {
        return j.decay;
      },
      tv: (beta: number) => (j.tv(a * beta) / a) * (1 + 4 * Number.EPSILON),
    };
    node.dampedRemainder = { cf: node.dampedLogCf, bound: (beta, t) => r.bound(a * beta, a * t * (1 - Number.EPSILON)), decay: r.decay, ...(jump ? { jump } : {}) };
  }
  // a compound's first claims carried through the scale (a lognormal compound's, ./severity-kernel-scale.ts)
  const sev = c.dampedSeverity;
  const sk = sev && sev.cf === c.dampedLogCf && node.dampedLogCf ? scaledSeverityKernel(sev.kernel, a) : null;
  if (sk) node.dampedSeverity = { cf: node.dampedLogCf!, kernel: sk };
}

export function carryShiftKernels(node: Node, b: number, c: Node) {
  const s = seriesOf(c);
  if (s) node.transformSeries = shiftSeries(b, s);
  const k = c.dampedKernels;
  if (k && k.cf === c.dampedLogCf && node.dampedLogCf)
    node.dampedKernels = { cf: node.dampedLogCf, kernels: k.kernels.map((x) => ({ ...x, at: x.at + b })), rate: k.rate };
  // the remainder after the atom at lo and the kernels, taken relative to lo (../invert/damped-psi.ts psiOf), is the
  // child's own: e^{(i t - beta) b} cancels against the lower end's b; its bound and split carry unchanged
  const r = c.dampedRemainder;
  if (r && r.cf === c.dampedLogCf && node.dampedLogCf && node.dampedKernels) node.dampedRemainder = { ...r, cf: node.dampedLogCf };
}
