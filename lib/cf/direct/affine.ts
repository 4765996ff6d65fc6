import { affinePowerTail } from "./power-tail";
import { directPoint, type DirectLaw, type DirectPoint } from "./types";
import { twoProdErr, twoSumErr } from "../moment-error";

/**
 * The law of a X + b from the law of X (a != 0 finite): F_Y(y) = F_X((y - b)/a) for a > 0, S_X((y - b)/a) for a < 0,
 * f_Y(y) = f_X((y - b)/a) / |a|. Error bounds scale with the density; the rounding of (y - b)/a is added as the
 * density times its size.
 */
export function affineDirect(law: DirectLaw, a: number, b: number): DirectLaw {
  if (a === 1 && b === 0) return law;
  const aa = Math.abs(a);
  const lo = a > 0 ? a * law.support[0] + b : a * law.support[1] + b;
  const hi = a > 0 ? a * law.support[1] + b : a * law.support[0] + b;
  const q = law.quantile;
  const near = directPoint();
  return {
    method: law.method,
    support: [Number.isNaN(lo) ? -Infinity : lo, Number.isNaN(hi) ? Infinity : hi],
    center: a * law.center + b,
    spread: aa * law.spread,
    ...(law.mode !== undefined ? { mode: a * law.mode + b } : {}),
    // the moved mode stays exact where a m and a m + b are (TwoProduct and TwoSum find no rounding)
    ...(law.modeExact && law.mode !== undefined && twoProdErr(a, law.mode, a * law.mode) === 0 && twoSumErr(a * law.mode, b, a * law.mode + b) === 0 ? { modeExact: true } : {}),
    ...(law.unimodal ? { unimodal: true } : {}),
    ...(law.powerTail ? { powerTail: affinePowerTail(law.powerTail, a, b) } : {}),
    // f_Y^(k)(y) = f_X^(k)((y - b)/a) / (a^k |a|): X's bound over the interval's image, widened by its rounding
    ...(law.pdfDeriv
      ? {
          pdfDeriv: (k: 1 | 3 | 7, y0: number, y1: number) => {
            const u = (y0 - b) / a;
            const v = (y1 - b) / a;
            const dx = (2 * Number.EPSILON * (Math.abs(y0) + Math.abs(y1) + Math.abs(b))) / aa + Number.EPSILON * (Math.abs(u) + Math.abs(v));
            return (law.pdfDeriv!(k, Math.min(u, v) - dx, Math.max(u, v) + dx) / Math.pow(aa, k + 1)) * (1 + 8 * Number.EPSILON);
          },
        }
      : {}),
    // atoms move with the law (a x + b, within the rounding of that product and sum: the location, not the mass)
    // (a < 0 turns F(x-) into S(x) = 1 - F(x-) - p)
    ...(law.atoms
      ? {
          atoms: law.atoms
            .map((t) => {
              const x = a * t.x + b;
              const xErr = aa * t.xErr + 2 * Number.EPSILON * (Math.abs(a * t.x) + Math.abs(x));
              return a > 0 ? { ...t, x, xErr } : { ...t, x, xErr, below: 1 - t.below - t.p, belowErr: t.belowErr + t.pErr + 2 * Number.EPSILON };
            })
            .sort((u, v) => u.x - v.x),
        }
      : {}),
    notes: law.notes,
    at(y: number, out: DirectPoint) {
      const x = (y - b) / a;
      // (y - b)/a is off by at most 2 ulps of its inputs: the cdf moves by f_X times that, or, where f_X is infinite
      // (a power singularity at the support's end), by at most F_X(x + dx) - F_X(x - dx) (both with their bounds)
      const dx = 2 * Number.EPSILON * (Math.abs(y) + Math.abs(b)) / aa + Number.EPSILON * Math.abs(x);
      law.at(x, out);
      let move = out.pdf * dx;
      // within a rounding of a singular point the density moves by much more than its relative bound: bound it by the
      // values at x -+ dx (monotone there on each side of the singular point), infinite if the rounding reaches it
      let pdfMove = 0;
      if (law.singular && Number.isFinite(out.pdf) && law.singular.some((s) => Math.abs(x - s) <= 1e6 * dx)) {
        const f0 = out.pdf;
        const e0 = out.pdfErr;
        // the rounding interval around a singular point: the cdf moves by the mass on it (the density is unbounded there)
        if (law.singular.some((s) => Math.abs(x - s) <= dx)) move = Math.max(move, massAround(law, x, dx, near));
        // a law that takes the offset from its one singular point exactly: that offset by error-free transformations,
        // the density there and its move over the offset's own (relative) rounding, monotone on that side of the point
        const off = law.singularPdf && law.singular.length === 1 ? exactOffset(y, a, b, law.singular[0]) : null;
        if (off && off.e < Math.abs(off.d)) {
          law.singularPdf!(off.d, near);
          const fd = near.pdf;
          const ed = near.pdfErr;
          for (const dd of [off.d - off.e, off.d + off.e]) {
            law.singularPdf!(dd, near);
            pdfMove = Math.max(pdfMove, Math.abs(near.pdf - fd) + near.pdfErr + ed);
          }
          out.pdf = fd;
          out.pdfErr = ed;
          if (!Number.isFinite(pdfMove)) pdfMove = Infinity;
        } else if (law.singular.some((s) => Math.abs(x - s) <= dx)) pdfMove = Infinity;
        else {
          const save = { ...out };
          for (const xe of [x - dx, x + dx]) {
            law.at(xe, near);
            pdfMove = Math.max(pdfMove, Math.abs(near.pdf - f0) + near.pdfErr + e0);
            move = Math.max(move, (near.pdf + near.pdfErr) * dx);
          }
          Object.assign(out, save);
        }
      }
      if (!Number.isFinite(out.pdf)) {
        law.at(x + dx, near);
        const up = near.cdf + near.cdfErr;
        law.at(x - dx, near);
        move = Math.max(up - (near.cdf - near.cdfErr), 0);
      }
      if (a < 0) {
        const c = out.cdf;
        const ce = out.cdfErr;
        out.cdf = out.sf;
        out.cdfErr = out.sfErr;
        out.sf = c;
        out.sfErr = ce;
      }
      out.cdfErr += move;
      out.sfErr += move;
      out.pdf /= aa;
      // an infinite density (a power singularity met exactly) is the exact limit: its bound stays 0
      out.pdfErr = out.pdfErr / aa + (Number.isFinite(out.pdf) ? 2 * Number.EPSILON * out.pdf + pdfMove / aa : 0);
      if (!(out.pdfErr <= Number.MAX_VALUE)) out.pdfErr = Number.MAX_VALUE;
    },
    // the split of X's tail at (y - b)/a, moved inward by its rounding (the sizes fall outward), the density per |a|
    // and the stop-loss transform times |a|; the side turns over with a < 0
    ...(law.monotoneSplit
      ? {
          monotoneSplit: (y: number, side: 1 | -1, step: number, stopLoss: boolean) => {
            const x = (y - b) / a;
            const s = a > 0 ? side : ((-side) as 1 | -1);
            const dx = 2 * Number.EPSILON * (Math.abs(y) + Math.abs(b)) / aa + Number.EPSILON * Math.abs(x);
            // the step rounded down: the rest's sum grows as the points close up
            const r = law.monotoneSplit!(x - s * dx, s, (step / aa) * (1 - 4 * Number.EPSILON), stopLoss);
            if (!r) return null;
            const up = 1 + 4 * Number.EPSILON;
            return { tail: r.tail, pdf: (r.pdf / aa) * up, stopLoss: aa * r.stopLoss * up, restTail: r.restTail, restPdf: (r.restPdf / aa) * up, restStopLoss: aa * r.restStopLoss * up };
          },
        }
      : {}),
    ...(q ? { quantile: (p: number) => (a > 0 ? a * q(p) + b : a * q(1 - p) + b) } : {}),
    // int_c^inf S_Y = |a| int_{(c-b)/a}^inf S_X (a > 0), |a| int_-inf^{(c-b)/a} F_X (a < 0); likewise on the left; the
    // rounding dx of (c - b)/a moves it by at most dx times the tail mass on [x - dx, x + dx], which (S_X falling, F_X
    // rising) is at most the mass at the end nearer the body, with its bound (not 1: far out the mass is ~ x^-alpha)
    ...(law.stopLoss
      ? {
          stopLoss: (c: number, side: 1 | -1) => {
            const x = (c - b) / a;
            const s = a > 0 ? side : ((-side) as 1 | -1);
            const r = law.stopLoss!(x, s);
            if (!r) return null;
            const dx = 2 * Number.EPSILON * (Math.abs(c) + Math.abs(b)) / aa + Number.EPSILON * Math.abs(x);
            law.at(x - s * dx, near);
            const m = s === 1 ? near.sf + near.sfErr : near.cdf + near.cdfErr;
            const mass = m >= 0 && m < 1 ? m : 1;
            return { v: aa * r.v, e: aa * (r.e + mass * dx) + 2 * Number.EPSILON * aa * r.v };
          },
        }
      : {}),
  };
}

/**
 * (y - b)/a - s with a bound on its error: y - b and a s each as an unevaluated sum by error-free transformations (Knuth's
 * TwoSum, Dekker's TwoProduct; Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 4.3), their
 * difference's leading part with its own TwoSum error, the three small parts summed (two roundings of at most u times
 * their sizes) and added (u of the result), then the quotient (u of it); 1% for the bounds' own rounding. Null where
 * TwoProduct does not apply.
 */
function exactOffset(y: number, a: number, b: number, s: number): { d: number; e: number } | null {
  const u = Number.EPSILON / 2;
  const hi = y - b;
  const e1 = twoSumErr(y, -b, hi);
  const P = a * s;
  const e2 = twoProdErr(a, s, P);
  if (e2 === null) return null;
  const n1 = hi - P;
  const e3 = twoSumErr(hi, -P, n1);
  const n = n1 + (e1 - e2 + e3);
  const eN = u * Math.abs(n) + 2 * u * (Math.abs(e1) + Math.abs(e2) + Math.abs(e3));
  const d = n / a;
  const e = 1.01 * (eN / Math.abs(a) + u * Math.abs(d));
  return Number.isFinite(d) && Number.isFinite(e) ? { d, e } : null;
}

/** F(x + dx) - F(x - dx) from above, each end within its bound (a point's rounding interval around a singular point) */
function massAround(law: DirectLaw, x: number, dx: number, near: DirectPoint): number {
  law.at(x + dx, near);
  const up = near.cdf + near.cdfErr;
  law.at(x - dx, near);
  return Math.max(up - (near.cdf - near.cdfErr), 0);
}
