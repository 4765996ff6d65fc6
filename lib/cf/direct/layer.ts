import type { LayerMoment } from "../families/layer-moments";
import { twoProdErr } from "../moment-error";
import { affineDirect } from "./affine";
import { directPoint, type DirectAtom, type DirectLaw, type DirectPoint } from "./types";

const U = Number.EPSILON / 2;

/**
 * A per-claim layer Y = c min((X - d)_+, l) of a claim X with a direct law, evaluated directly (common practice, e.g.
 * Klugman, Panjer & Willmot, Loss Models, coverage modifications): an atom at 0 of mass F_X(d), an atom at c l of mass
 * S_X(d + l) (l finite), and between them the law of c (X - d), whose cdf, sf and density come from X's direct law
 * through two affine steps (shift by -d, scale by c; each bounds its own rounding of the argument, ./affine.ts). The
 * atom at c l stands at the double nearest c l: within 2u c l of it the cdf is only known to lie between the
 * continuous part's value and 1, and is answered with that interval. The stop-loss transforms, on which expected
 * shortfall rests, come from the claim's layer moments in closed form with their derived bounds:
 *   E[(Y - y)_+] = c E[min((X - d - y/c)_+, l - y/c)],   E[(y - Y)_+] = y - c E[min((X - d)_+, y/c)]   (0 <= y < c l),
 * each Lipschitz in its layer's ends with the claim's tail probabilities there as rates, so the arguments' roundings add
 * their sizes times S_X at the lowest point they reach. Null where the terms are not a proper layer.
 */
export function layerDirect(x: DirectLaw, layerMoment: LayerMoment, d: number, l: number, c: number): DirectLaw | null {
  if (!(c > 0 && Number.isFinite(c) && l > 0 && Number.isFinite(d))) return null;
  const A = affineDirect(affineDirect(x, 1, -d), c, 0);
  const finite = Number.isFinite(l);
  const top = finite ? c * l : Infinity;
  // the exact c l lies within [topLo, topHi]; a point where the product is exact (Dekker's TwoProduct: no residual, e.g.
  // c = 1) has no such band
  const exact = finite && twoProdErr(c, l, top) === 0;
  const topLo = exact ? top : top * (1 - 2 * U);
  const topHi = exact ? top : top * (1 + 2 * U);
  if (!(top > 0)) return null;
  const pt = directPoint();
  const meanE = layerMoment(1, d, l);
  if (!Number.isFinite(meanE.v) || !Number.isFinite(meanE.e)) return null;
  // E Y and its bound (the product's rounding)
  const mean = c * meanE.v;
  const meanErr = c * meanE.e + 2 * U * Math.abs(mean);
  const atoms: DirectAtom[] = [];
  A.at(0, pt);
  if (pt.cdf > 0) atoms.push({ x: 0, p: pt.cdf, pErr: pt.cdfErr, below: 0, belowErr: 0, xErr: 0 });
  if (finite) {
    A.at(top, pt);
    // S and F at the double c l, and the mass within its rounding of the exact c l (the density there, doubled)
    const move = exact ? 0 : 2 * U * top * 2 * (pt.pdf + pt.pdfErr);
    const m = Number.isFinite(move) ? move : 1;
    if (pt.sf > 0) atoms.push({ x: top, p: pt.sf, pErr: pt.sfErr + m, below: pt.cdf, belowErr: pt.cdfErr + m, xErr: exact ? 0 : 2 * U * top });
  }
  // S_X at z from above (its bound; at most 1), a rate for the stop-loss transforms' argument roundings below
  const xp = directPoint();
  const sfAbove = (z: number) => {
    x.at(z, xp);
    return Math.min(xp.sf + xp.sfErr, 1) * (1 + 2 * U);
  };
  const lower = A.support[0] > 0 ? A.support[0] : 0;
  const upper = finite ? top : A.support[1];
  const q = A.quantile;
  return {
    method: x.method,
    support: [0, upper],
    center: Math.min(Math.max(A.center, 0), upper),
    spread: finite ? Math.min(A.spread, top) : A.spread,
    notes: [
      ...x.notes,
      "per-claim layer evaluated from the claim law's cdf, sf and density (atoms at 0 and at the limit exactly); expected shortfall from the claim's layer moments in closed form",
    ],
    atoms,
    ...(q ? { quantile: (p: number) => Math.min(Math.max(q(p), lower), upper) } : {}),
    at(y: number, out: DirectPoint) {
      if (y < 0) return set(out, 0, 0, 1, 0, 0, 0);
      if (y >= topHi) return set(out, 1, 0, 0, 0, 0, 0);
      A.at(y, out);
      if (y >= topLo) {
        // the continuous part's cdf, or 1 past the atom: the interval [F - e, 1]
        const lo = Math.max(out.cdf - out.cdfErr, 0);
        const v = 0.5 * (lo + 1);
        const e = 0.5 * (1 - lo) + 2 * U;
        return set(out, v, e, 1 - v, e, out.pdf, out.pdfErr);
      }
    },
    stopLoss(y: number, side: 1 | -1) {
      if (side === 1) {
        if (y <= 0) return { v: mean - y, e: meanErr + 2 * U * (mean + Math.abs(y)) };
        if (y >= topHi) return { v: 0, e: 0 };
        const t = y / c;
        const dd = d + t;
        const ll = l - t;
        const r = layerMoment(1, dd, ll);
        if (!Number.isFinite(r.v) || !Number.isFinite(r.e)) return null;
        // t within u t, d + t and l - t within u of themselves (infinite l: none); E min((X - a)^+, b) moves with a at
        // rate S_X(a) and with b at rate S_X(a + b), each at most its value at the lowest point the roundings reach
        const da = U * (Math.abs(t) + Math.abs(dd));
        const db = finite ? U * (Math.abs(t) + Math.abs(ll)) : 0;
        const arg = da * sfAbove(dd - 2 * da) + (finite ? db * sfAbove(dd + ll - 2 * (da + db)) : 0);
        const v = c * Math.max(r.v, 0);
        return { v, e: c * (r.e + arg) + 2 * U * v };
      }
      if (y <= 0) return { v: 0, e: 0 };
      if (y >= topHi) return { v: y - mean, e: meanErr + 2 * U * (Math.abs(y) + mean) };
      const t = y / c;
      const r = layerMoment(1, d, t);
      if (!Number.isFinite(r.v) || !Number.isFinite(r.e)) return null;
      const m = c * r.v;
      const v = Math.max(y - m, 0);
      // t within u t moves E min((X - d)^+, t) at rate S_X(d + t) (at most its value at the lowest point reached)
      const dt = U * Math.abs(t);
      return { v, e: c * (r.e + dt * sfAbove(d + t - 2 * dt - 2 * U * Math.abs(d + t))) + 2 * U * (Math.abs(y) + Math.abs(m)) };
    },
  };
}

function set(out: DirectPoint, cdf: number, cdfErr: number, sf: number, sfErr: number, pdf: number, pdfErr: number): void {
  out.cdf = cdf;
  out.cdfErr = cdfErr;
  out.sf = sf;
  out.sfErr = sfErr;
  out.pdf = pdf;
  out.pdfErr = pdfErr;
}
