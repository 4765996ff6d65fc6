import { directPoint, type DirectLaw } from "./types";

// The mode of a directly evaluated law, or an interval holding it, for the shortfall brackets (./shortfall-sweep.ts).

/**
 * An interval holding the law's mode: [mode, mode] where DirectLaw.mode gives it; for a unimodal law (DirectLaw.unimodal)
 * one derived from density values with their bounds: f non-decreasing up to the mode M and non-increasing after, so
 * f(x1) < f(x2) (beyond both bounds) with x1 < x2 puts M above x1, and f(x1) > f(x2) puts it below x2; else unknown.
 */
export function modeRange(law: DirectLaw): readonly [number, number] {
  if (law.mode !== undefined && Number.isFinite(law.mode)) return [law.mode, law.mode];
  const given = law.modeRange;
  if (given && Number.isFinite(given[0]) && Number.isFinite(given[1])) return given;
  if (!law.unimodal) return [-Infinity, Infinity];
  let r = MODES.get(law);
  if (!r) MODES.set(law, (r = searchMode(law)));
  return r;
}

const MODES = new WeakMap<DirectLaw, readonly [number, number]>();

function searchMode(law: DirectLaw): readonly [number, number] {
  const pt = directPoint();
  const [sLo, sHi] = law.support;
  const at = (x: number): [number, number] => {
    law.at(x, pt);
    return Number.isFinite(pt.pdf) ? [pt.pdf - pt.pdfErr, pt.pdf + pt.pdfErr] : [Infinity, Infinity];
  };
  // the largest density on a grid of 129 points over 16 spreads; its neighbours bracket the mode when the bounds part them
  const n = 64;
  const xs: number[] = [];
  const fs: [number, number][] = [];
  for (let j = -n; j <= n; j++) {
    const x = Math.min(Math.max(law.center + (law.spread * j) / 8, sLo), sHi);
    xs.push(x);
    fs.push(at(x));
  }
  let k = 0;
  for (let j = 1; j < xs.length; j++) if (fs[j][0] + fs[j][1] > fs[k][0] + fs[k][1]) k = j;
  let L = k > 0 && fs[k - 1][1] < fs[k][0] ? xs[k - 1] : xs[k] === sLo ? sLo : -Infinity;
  let R = k < xs.length - 1 && fs[k + 1][1] < fs[k][0] ? xs[k + 1] : xs[k] === sHi ? sHi : Infinity;
  if (!(Number.isFinite(L) && Number.isFinite(R))) return [L, R];
  // narrowed by thirds while the bounds still tell the two inner points apart
  for (let it = 0; it < 60 && R - L > 1e-12 * (Math.abs(L) + Math.abs(R) + law.spread); it++) {
    const x1 = L + (R - L) / 3;
    const x2 = R - (R - L) / 3;
    const f1 = at(x1);
    const f2 = at(x2);
    if (f1[1] < f2[0]) L = x1;
    else if (f1[0] > f2[1]) R = x2;
    else break;
  }
  return [L, R];
}
