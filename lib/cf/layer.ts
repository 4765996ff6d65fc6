/**
 * Per-claim layer: Y = c min(max(X - d, 0), l) (deductible d, limit l, share c). Its law has atoms at 0 (mass F(d))
 * and at c l (mass S(d + l)) and, for a continuous claim law, the density f(d + y/c)/c on (0, c l).
 */
import type { Node } from "./node";
import { rawToCumulants } from "./node";
import { CfError } from "./errors";
import { atomsNode } from "./tabulated";
import { cabs } from "./complex";
import { principalLogRound } from "./families/log-round-principal";
import { MAX_LATTICE } from "./limits";
import type { DirectLaw } from "./families/dist";
import type { SeverityLaw } from "./discretise";
import { restrictedIntegral } from "./quadrature";
import { checkDeadline } from "./deadline";
import { discMesh, oscillatoryIntegral, type OscillatoryIntegral } from "./filon";
import { withCumulantErrors } from "./cumulant-bounds";
import { exact, mul, powInt, rawToCumulantsE, type Est } from "./moment-error";
import { directPoint } from "./direct/types";
import { layerDirect } from "./direct/layer";
import type { DensityDisc } from "./families/layer-analytic";

/** Smallest u >= 0 (on a doubling search) with S(d + u) <= q. */
function tailPoint(dist: DirectLaw, d: number, q: number, start: number): number {
  let u = start;
  for (let i = 0; i < 2000 && dist.sf(d + u) > q; i++) u *= 2;
  return u;
}

/**
 * Panels on [0, L] for integrands against f(d + u): geometric widths from w0 (resolving an endpoint singularity or
 * the start of the support), at most `maxWidth` each.
 */
function panels(L: number, w0: number, maxWidth: number, cap: number, growth = 1.25): number[] {
  const b = [0];
  let w = w0;
  while (b[b.length - 1] < L && b.length < cap) {
    b.push(Math.min(L, b[b.length - 1] + Math.min(w, maxWidth)));
    w *= growth;
  }
  if (b[b.length - 1] < L) b.push(L);
  return b;
}

/** the claim density at x from one side (a point just inside when the density is not defined at x itself) */
function edgeDensity(dist: DirectLaw, x: number, side: 1 | -1): number {
  const v = dist.pdf(x);
  if (Number.isFinite(v) && v > 0) return v;
  const w = dist.pdf(x + side * 1e-9 * Math.max(Math.abs(x), 1e-300));
  return Number.isFinite(w) ? w : NaN;
}

/**
 * the claim density's slope at x from one side (side 1: from the right), from its values at x + side j s (j = 1, 2, 3:
 * the quadratic through them, differentiated at x) at steps s and s / 2, combined by Richardson (error O(s^3)); NaN where
 * the density is not finite there. It sets only the sizes of the kink kernels (taken out before the inversion and added
 * back exactly), so an error in it slows the remainder's decay and leaves the bounds as they are
 */
function edgeSlope(dist: DirectLaw, x: number, side: 1 | -1, s: number): number {
  const d = (h: number) => (side * (-2.5 * dist.pdf(x + side * h) + 4 * dist.pdf(x + 2 * side * h) - 1.5 * dist.pdf(x + 3 * side * h))) / h;
  const v = (4 * d(s / 2) - d(s)) / 3;
  return Number.isFinite(v) ? v : NaN;
}

/**
 * its second derivative there likewise: the cubic through x + side j s (j = 1..4), differentiated twice at x, (3 f1 - 8 f2 +
 * 7 f3 - 2 f4) / s^2, at steps s and s / 2 combined by Richardson (error O(s^3)); the same role and caveat as edgeSlope
 */
function edgeCurve(dist: DirectLaw, x: number, side: 1 | -1, s: number): number {
  const f = (h: number) => dist.pdf(x + side * h);
  const d = (h: number) => (3 * f(h) - 8 * f(2 * h) + 7 * f(3 * h) - 2 * f(4 * h)) / (h * h);
  const v = (4 * d(s / 2) - d(s)) / 3;
  return Number.isFinite(v) ? v : NaN;
}

export interface LayerTerms {
  deductible: number;
  limit: number;
  share: number;
}

export function layerNode(X: Node, terms: Partial<LayerTerms>, disc: DensityDisc | null = null): Node {
  const d = terms.deductible ?? 0;
  const l = terms.limit ?? Infinity;
  const c = terms.share ?? 1;
  if (X.kind.type !== "continuous") return discreteLayer(X, d, l, c);
  const dist = X.dist;
  if (!dist) throw new CfError("not_applicable", "/of", "A per-claim layer needs a claim law with a closed-form cdf.");
  // the claim law's cdf and sf with bounds on their errors (claimCdf below)
  const { cdfE, sfE } = claimCdf(X, dist);
  const FdE = cdfE(d);
  const SdlE = l < Infinity ? sfE(d + l) : { v: 0, e: 0 };
  const Fd = FdE.v;
  const Sdl = SdlE.v;
  const u0 = Math.max(0, dist.lo - d); // the density of X - d starts here
  const scaleX = Math.max(X.scale, 1e-300);
  const L = l < Infinity ? l : tailPoint(dist, d, 1e-18, Math.max(scaleX, u0 + scaleX));
  // the mass left out beyond d + L for an unlimited layer
  const cutE = l < Infinity ? { v: 0, e: 0 } : sfE(d + L);
  const cut = cutE.v + cutE.e;
  // panels grow geometrically from the start of the claim density; when the layer starts at the support's end the
  // density may be singular there (gamma or weibull shapes below 1), so the first panel is tiny (mass ~ its width^shape)
  const w0 = (Math.min(scaleX, L) / 256) * (d <= dist.lo ? 2 ** -120 : 1);
  const base0 = panels(L - u0, w0, Infinity, 8000).map((v) => v + u0);
  // the density's formula changes at its breaks (support ends, a triangular mode): panels are cut there
  const cuts = (disc?.breaks ?? []).map((x) => x - d).filter((u) => u > base0[0] && u < base0[base0.length - 1]);
  const base = cuts.length ? [...new Set([...base0, ...cuts])].sort((a, b) => a - b) : base0;
  const atoms = [
    { x: 0, p: Fd },
    { x: c * l, p: Sdl },
  ].filter((a) => a.p > 0 && Number.isFinite(a.x));
  // int_{u0}^{L} g(u) f(d + u) du on the base panels, each split into m equal parts
  const claimPdf = (u: number) => dist.pdf(d + u);
  const integrate = (g: (u: number) => [number, number], split: (w: number) => number): [number, number] =>
    restrictedIntegral(base, claimPdf, g, split);
  // raw moments E Y^k = c^k E[min((X - d)_+, l)^k]: in closed form with a derived bound where the claim law has one
  // (families/layer-moments.ts), else by composite Gauss-Legendre, int u^k f(d + u) du + l^k S(d + l), without a bound
  const rawCache: number[] = [];
  const rawEst: Est[] = [];
  const closed = (k: number): Est | null => {
    if (!dist.layerMoment) return null;
    rawEst[k] ??= mul(powInt(exact(c), k), dist.layerMoment(k, d, l));
    return Number.isFinite(rawEst[k].e) ? rawEst[k] : null;
  };
  const raw = (k: number): number | null => {
    if (l === Infinity && k >= X.momentIndex) return null;
    if (rawCache[k] === undefined) {
      const cf = closed(k);
      // the closed form where it resolves the moment to 1e-9 of itself; either value's bound is the closed form's
      // bound plus their difference (cumulantEst), so the choice only decides which value is reported
      if (cf && cf.e <= 1e-9 * Math.abs(cf.v)) rawCache[k] = cf.v;
      else {
        const [v] = integrate((u) => [u ** k, 0], () => 4);
        rawCache[k] = c ** k * (v + (l < Infinity ? l ** k * Sdl : 0));
      }
    }
    return rawCache[k];
  };
  const mean = raw(1);
  const m2 = raw(2);
  const slopeStep = Math.min(3e-4 * scaleX, (L - u0) / 8);
  const curveStep = Math.min(3e-3 * scaleX, (L - u0) / 8);
  const sev: SeverityLaw & { atoms: { x: number; p: number }[] } = {
    name: "layer",
    pdf: (y) => (y > 0 && y < c * l ? dist.pdf(d + y / c) / c : 0),
    lo: c * u0,
    upper: (q) => (l < Infinity ? c * l : c * tailPoint(dist, d, q, Math.max(scaleX, u0 + scaleX))),
    scale: l < Infinity ? c * l : c * Math.min(scaleX, X.severity?.scale ?? scaleX),
    tailIndex: l < Infinity ? Infinity : X.tails.right,
    rootAtZero: d <= dist.lo && X.severity ? X.severity.rootAtZero : 1,
    atoms,
    edges: {
      start: c * u0,
      fStart: edgeDensity(dist, d + u0, 1) / c,
      fEnd: l < Infinity ? edgeDensity(dist, d + l, -1) / c : 0,
      // the slopes there (steps well inside the layer: the three points from the limit stay above its start)
      dStart: edgeSlope(dist, d + u0, 1, slopeStep) / (c * c),
      dEnd: l < Infinity ? edgeSlope(dist, d + l, -1, slopeStep) / (c * c) : 0,
      eStart: edgeCurve(dist, d + u0, 1, curveStep) / (c * c * c),
      eEnd: l < Infinity ? edgeCurve(dist, d + l, -1, curveStep) / (c * c * c) : 0,
    },
    // the layered claim's own cdf and sf (atoms included): the bounding discretisation takes cell masses from them
    cdf: (y) => (y < 0 ? 0 : y >= c * l ? 1 : dist.cdf(d + y / c)),
    sf: (y) => (y < 0 ? 1 : y >= c * l ? 0 : dist.sf(d + y / c)),
    // the same with their bounds (the discretisation's bracket takes these where given)
    cdfE: (y) => (y < 0 ? { v: 0, e: 0 } : y >= c * l ? { v: 1, e: 0 } : cdfE(d + y / c)),
    sfE: (y) => (y < 0 ? { v: 1, e: 0 } : y >= c * l ? { v: 0, e: 0 } : sfE(d + y / c)),
    mean: mean ?? undefined,
    ...(closed(1) ? { meanE: closed(1)! } : {}),
    ...(l < Infinity ? { bound: c * l } : {}),
    // an upper bound on E[Y 1{Y > y}]: with W = (X - d)_+ and b = y/c < l, E[Y; Y > y] = c (E min(W, l) - E min(W, b)) +
    // y P(X > d + b), the two limited means from the claim law's layer moments with their derived bounds, the sf taken
    // at a point rounded down past the argument's rounding (sf decreases; d + b within 2u |d + b| for d >= 0) and
    // raised by its bound; Infinity without the closed form
    tailMean: (y) => tailMeanBound(dist, sfE, c, d, l, y),
  };
  // with a derived remainder the rule needs far fewer panels: each as wide as its bound allows (filon.ts discMesh),
  // from a first panel of negligible mass where the density is not analytic at the layer's start
  const filonPanels = (mass: (a: number, b: number) => number, logK: (m: number, R: number) => number) => {
    const x0 = d + u0;
    const smooth = disc!.logBound(x0, 1e-3 * Math.max(Math.abs(x0), scaleX)) < Infinity;
    // not analytic at the start: the first panel is the widest (halving from scale / 8) of negligible mass, dropped
    let w = Math.min(scaleX, L) / 8;
    for (let i = 0; !smooth && i < 400 && !(mass(u0, u0 + w) < 1e-19); i++) w /= 2;
    return discMesh(u0, L, cuts, w, logK, mass);
  };
  // the claim density's partial transform int f(d + u) e^{i s u} du, built once (Filon-type, cost independent of s)
  let osc: OscillatoryIntegral | null = null;
  const oscillatory = (): OscillatoryIntegral => {
    if (!osc) {
      // an upper bound on int_a^b f from the cdf (or sf past the median, where the cdf's difference would cancel) and
      // the two values' bounds
      const mass = (a: number, b: number) => {
        const Fa = cdfE(d + a);
        if (Fa.v < 0.5) {
          const Fb = cdfE(d + b);
          return Fb.v - Fa.v + (Fa.e + Fb.e) * (1 + 2 * Number.EPSILON) + Number.EPSILON * Fb.v;
        }
        const Sa = sfE(d + a);
        const Sb = sfE(d + b);
        return Sa.v - Sb.v + (Sa.e + Sb.e) * (1 + 2 * Number.EPSILON) + Number.EPSILON * Sa.v;
      };
      // with the density's disc bound the rule's error is derived (filon.ts); the values' own bounds from the direct law
      const pt = directPoint();
      const dl = X.direct;
      const opts = disc && dl
        ? {
            disc: (m: number, R: number) => disc.logBound(d + m, R + 2 * Number.EPSILON * Math.abs(d + m)),
            fErr: (u: number) => {
              dl.at(d + u, pt);
              return pt.pdfErr;
            },
            offset: d,
          }
        : {};
      // with a disc bound the rule fits the direct law's density values (their own bound is then fErr's whole)
      const pf = directPoint();
      const fDirect = (u: number) => {
        dl!.at(d + u, pf);
        return pf.pdf;
      };
      osc = oscillatoryIntegral(opts.disc ? filonPanels(mass, opts.disc) : base, opts.disc ? fDirect : claimPdf, mass, opts);
    }
    return osc;
  };
  const node: Node = {
    kind: { type: "mixed", atoms: atoms.slice().sort((a, b) => a.x - b.x), atomsComplete: true },
    momentIndex: l < Infinity ? Infinity : X.momentIndex,
    tails: { left: Infinity, right: l < Infinity ? Infinity : X.tails.right },
    nodes: 1 + X.nodes,
    get cfAbsError() {
      // the Filon rule's interpolation and rounding error, the atoms' masses' bounds and the claim mass left out; plus the
      // assembly's rounding (u = eps/2): the sums and the product with cos/sin 5 sqrt(2) u of the moduli' sum (at most
      // about 1), the log of |.| and its exp back 9u (cabs 2 eps, log and exp one ulp each, m |log m| <= 1/e), the angle
      // through atan2 (principal: |Im L| <= pi) and cos/sin (2 pi + 2) u: below 16 eps together; the rounded frequencies
      // c t and s l are the node's argSlope (layerRounding below, with the rule's own frequency rounding, filon.ts slope)
      return oscillatory().error + FdE.e + SdlE.e + cut + 16 * Number.EPSILON;
    },
    notes: [
      ...X.notes.filter((n) => !/CF computed/.test(n)),
      `per-claim layer CF by a Filon-type rule on the claim density (Legendre interpolant on each panel, integrated exactly against e^{ist}; ${disc && X.direct ? "error derived per panel from a bound of the density on complex discs" : "error measured per panel: an estimate, not a derived bound"})${cut > 0 ? `; claim mass beyond ${d + L} left out: ${cut.toExponential(2)}` : ""}; ${dist.layerMoment ? "moments in closed form from the claim law's partial moments, each with a derived bound (where none can be formed, e.g. a rounded argument next to a pole, the moment by composite Gauss-Legendre quadrature without one)" : "moments by composite Gauss-Legendre quadrature, without a derived bound"}`,
    ],
    location: mean ?? c * Math.min(l, scaleX),
    scale: mean !== null && m2 !== null ? Math.sqrt(Math.max(m2 - mean * mean, 0)) || c * scaleX : c * Math.min(l, scaleX),
    support: [0, c * Math.min(l, Math.max(0, X.support[1] - d))],
    logCf(t, re, im) {
      const rule = oscillatory();
      const out = new Float64Array(2);
      for (let k = 0; k < t.length; k++) {
        if ((k & 255) === 0) checkDeadline("layer-cf");
        const s = c * t[k];
        rule.at(s, out);
        let r = Fd + out[0];
        let i = out[1];
        if (Sdl > 0) {
          r += Sdl * Math.cos(s * l);
          i += Sdl * Math.sin(s * l);
        }
        re[k] = Math.log(cabs(r, i));
        // the principal argument, no unwrap: its size is then bounded whatever the grid (families/log-round-principal.ts)
        im[k] = Math.atan2(i, r);
      }
    },
    cumulants: (n) => rawToCumulants(Array.from({ length: n }, (_, i) => raw(i + 1))),
    severity: sev,
    ...layerRounding(c, l, Sdl + SdlE.e, closed(1)),
  };
  // the Filon rule's own frequency rounding (filon.ts slope, per unit s = c t) on top of the node's argSlope
  const own = node.argSlope;
  if (own !== undefined) Object.defineProperty(node, "argSlope", { get: () => (own + c * oscillatory().slope) * (1 + 2 * Number.EPSILON), enumerable: true, configurable: true });
  if (!dist.layerMoment) return node;
  // a claim with a direct law: the layer's values, quantiles and ES from it (./direct/layer.ts), no inversion
  const direct = X.direct ? layerDirect(X.direct, dist.layerMoment, d, l, c) : null;
  if (direct) node.direct = direct;
  return withCumulantErrors(node, (n) =>
    rawToCumulantsE(Array.from({ length: n }, (_, i) => (l === Infinity && i + 1 >= X.momentIndex ? null : closed(i + 1)))),
  );
}

/** Layer of a law with atoms (lattice, sample): each atom x moves to c min(max(x - d, 0), l), exactly. */
function discreteLayer(X: Node, d: number, l: number, c: number): Node {
  const k = X.kind;
  let xs: number[] = [];
  let ps: number[] = [];
  if ((k.type === "lattice" || k.type === "discrete") && k.atoms) {
    xs = k.atoms.map((a) => a.x);
    ps = k.atoms.map((a) => a.p);
  } else if (X.table) {
    const t = X.table(MAX_LATTICE);
    // (a table whose dropped mass may lie below it, a reversed one's, has no place to put that mass here)
    if (!t || (t.tailMass > 1e-15 && l === Infinity) || t.cdfError || (t.tailMass > 0 && (t.tailBelow || !Number.isFinite(X.support[0]))))
      throw new CfError("not_applicable", "/of", "This claim law has too many atoms to lay out exactly under an unlimited layer; give the layer a limit.");
    for (let i = 0; i < t.p.length; i++) {
      xs.push(t.origin + i * t.step);
      ps.push(t.p[i]);
    }
    if (t.tailMass > 0) {
      xs.push(d + l);
      ps.push(t.tailMass);
    }
  } else throw new CfError("not_applicable", "/of", "A per-claim layer needs a claim law with a closed-form cdf, or a lattice or sample law.");
  const ys = Float64Array.from(xs, (x) => c * Math.min(Math.max(x - d, 0), l));
  return atomsNode(ys, Float64Array.from(ps));
}

/** an upper bound on E[Y 1{Y > y}], Y = c min((X - d)_+, l) (see the severity's tailMean above) */
function tailMeanBound(dist: DirectLaw, sfE: (x: number) => Est, c: number, d: number, l: number, y: number): number {
  const U = Number.EPSILON / 2;
  const b = y / c;
  if (!(b < l)) return 0;
  if (!dist.layerMoment || !(d >= 0)) return Infinity;
  const ml = dist.layerMoment(1, d, l);
  const mb = b > 0 ? dist.layerMoment(1, d, b) : { v: 0, e: 0 };
  if (!(Number.isFinite(ml.e) && Number.isFinite(mb.e))) return Infinity;
  let sf = 0;
  if (b > 0) {
    const x = d + b;
    const s = sfE(x - 4 * U * x);
    sf = (s.v + s.e) * (1 + 2 * U);
  }
  const diff = ml.v + ml.e - (mb.v - mb.e);
  return Math.max(0, c * diff * (1 + 4 * U) + y * sf * (1 + 2 * U)) * (1 + 2 * U);
}

/**
 * The claim law's cdf and sf at x with bounds on their errors: from its direct route (per-value derived bounds,
 * ./direct/types.ts) where it has one, plus the move of x's rounding by the caller (d + u: 2u |x|, times twice the
 * density there); else the closed forms' values with no bound (Infinity)
 */
function claimCdf(X: Node, dist: DirectLaw): { cdfE: (x: number) => Est; sfE: (x: number) => Est } {
  const dl = X.direct;
  // (a claim with closed forms always has its direct route: without one no bound is derived, so none is claimed)
  if (!dl) return { cdfE: (x) => ({ v: dist.cdf(x), e: Infinity }), sfE: (x) => ({ v: dist.sf(x), e: Infinity }) };
  const pt = directPoint();
  const moved = (x: number) => (x === 0 ? 0 : Number.isFinite(pt.pdf) ? 2 * pt.pdf * 2 * Number.EPSILON * Math.abs(x) : Infinity);
  return {
    cdfE(x) {
      dl.at(x, pt);
      return { v: pt.cdf, e: pt.cdfErr + moved(x) };
    },
    sfE(x) {
      dl.at(x, pt);
      return { v: pt.sf, e: pt.sfErr + moved(x) };
    },
  };
}

/**
 * The layer's rounded frequencies and its principal log (Y = c min((X - d)+, l) on [0, c l]): E Y <= m, the least of c l and
 * the closed-form mean's upper end (none derived for an unlimited layer without it). fl(c t) moves phi_Y by at most u c |t|
 * E[min((X - d)+, l)] = u |t| E Y (|d phi / ds| <= E Y / c at s = c t; none for c = 1), and fl(s l) the top atom's phase by
 * u |s l|, so its value by S(d + l) u c l |t| (1 + u): the node's argSlope (its absolute CF error per unit |t|, on top of
 * X's, which the Filon rule reads through X's density, not its CF: none). The log's rounding by principalLogRound(m, 0).
 */
function layerRounding(c: number, l: number, Sdl: number, mean: Est | null): Pick<Node, "argSlope" | "logRoundSlope" | "logRoundAt"> {
  const EPS = Number.EPSILON;
  const byMean = mean && Number.isFinite(mean.e) ? (mean.v + mean.e) * (1 + 2 * EPS) : Infinity;
  const m = Math.min(l < Infinity ? c * l : Infinity, byMean);
  if (!Number.isFinite(m)) return {};
  const argSlope = ((c === 1 ? 0 : (EPS / 2) * m) + (l < Infinity && Sdl > 0 ? (EPS / 2) * c * l * Sdl * (1 + EPS) : 0)) * (1 + 4 * EPS);
  return { argSlope, ...principalLogRound(m, 0) };
}
