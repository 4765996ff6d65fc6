import type { Node } from "./node";
import { rawToCumulants } from "./node";
import { cabs, nearestZero, sortedAnchor, unwrapFrom } from "./complex";
import { MAX_ATOMS, mergeAtoms } from "./kinds";
import { commonStep } from "./lattice";
import type { Atom } from "./types";
import { point } from "./families/discrete";
import { withLatticeLogRound } from "./families/log-round-table";

/** Lattice law on origin + k step: phi(t) = sum_k p_k e^{i t (origin + k step)} (direct sum, centred at the mean). */
export function latticeNode(origin: number, step: number, pIn: ArrayLike<number>, note?: string): Node {
  let f = 0;
  let l = pIn.length - 1;
  while (f < l && !(pIn[f] > 0)) f++;
  while (l > f && !(pIn[l] > 0)) l--;
  const o = origin + f * step;
  if (f === l) return point(o);
  const p = Float64Array.from({ length: l - f + 1 }, (_, k) => pIn[f + k]);
  let total = 0;
  for (let k = 0; k < p.length; k++) total += p[k];
  for (let k = 0; k < p.length; k++) p[k] /= total;
  // the probabilities as given are the law; normalising rounds each within gamma_n relative (the sum n - 1 roundings,
  // the division one; none when the sum is exactly 1): the table's rounding bound (./table-rounding.ts)
  const u = Number.EPSILON / 2;
  const rel = total === 1 ? 0 : (p.length * u) / (1 - p.length * u);
  let pMax = 0;
  for (let k = 0; k < p.length; k++) pMax = Math.max(pMax, p[k]);
  const round = { pmf: rel * pMax * (1 + 2 * rel), l1: rel * (1 + 2 * rel) * (1 + p.length * Number.EPSILON) };
  // and per entry, within rel of itself (./table-rounding.ts pointErrOf)
  const pointErr = Float64Array.from(p, (v) => rel * v * (1 + 2 * rel));
  const xs = Float64Array.from(p, (_, k) => o + k * step);
  const base = atomsNode(xs, p);
  const atoms: Atom[] | null = p.length <= MAX_ATOMS ? mergeAtoms(Array.from(p, (v, k) => ({ x: xs[k], p: v }))) : null;
  const isCount = Number.isInteger(o) && o >= 0 && Number.isInteger(step);
  const node: Node = {
    ...base,
    notes: [...(note ? [note] : []), ...(Math.abs(total - 1) > 1e-14 ? [`lattice probabilities summed to ${total}; normalised to 1`] : [])],
    kind: { type: "lattice", origin: o, step, atoms },
    table: (maxLength) => {
      if (p.length <= maxLength) return { origin: o, step, p: p.slice(), tailMass: 0, round, pointErr };
      let tail = 0;
      for (let k = maxLength; k < p.length; k++) tail += p[k];
      return { origin: o, step, p: p.slice(0, maxLength), tailMass: tail, round, pointErr: pointErr.slice(0, maxLength) };
    },
  };
  if (isCount) {
    node.countCgf = (wr, wi, re, im) => {
      // log(z^o sum_k p_k (z^step)^k), Horner in z^step, z = e^w (|z| <= 1)
      for (let k = 0; k < wr.length; k++) {
        const e = Math.exp(step * wr[k]);
        const zr = e * Math.cos(step * wi[k]);
        const zi = e * Math.sin(step * wi[k]);
        let sr = 0;
        let si = 0;
        for (let j = p.length - 1; j >= 0; j--) {
          const nr = sr * zr - si * zi + p[j];
          si = sr * zi + si * zr;
          sr = nr;
        }
        re[k] = Math.log(cabs(sr, si)) + o * wr[k];
        im[k] = Math.atan2(si, sr) + o * wi[k];
      }
      unwrapFrom(im, nearestZero(wr, wi));
    };
    node.p0 = o === 0 ? p[0] : 0;
  }
  // claim-law rounding (./families/log-round-table.ts): the table's argument over one period
  return withLatticeLogRound(node, o, step, p);
}

/** Finite discrete law: phi(t) = sum_j p_j e^{i t x_j}, summed about the mean with re-anchored rotations. */
export function atomsNode(xs: Float64Array, ps: Float64Array): Node {
  const n = xs.length;
  let mean = 0;
  for (let j = 0; j < n; j++) mean += ps[j] * xs[j];
  const cm = (r: number) => {
    let s = 0;
    for (let j = 0; j < n; j++) s += ps[j] * (xs[j] - mean) ** r;
    return s;
  };
  let lo = Infinity;
  let hi = -Infinity;
  for (let j = 0; j < n; j++) {
    if (xs[j] < lo) lo = xs[j];
    if (xs[j] > hi) hi = xs[j];
  }
  const sd = Math.sqrt(cm(2));
  // equally spaced xs allow the rotation recurrence; otherwise cos/sin per term
  const equal = n > 2 && xs.every((x, j) => j === 0 || Math.abs(x - xs[0] - j * (xs[1] - xs[0])) <= 1e-12 * Math.max(Math.abs(x), 1));
  const atoms = n <= MAX_ATOMS ? mergeAtoms(Array.from(xs, (x, j) => ({ x, p: ps[j] }))) : null;
  let natural = true;
  let p0 = 0;
  for (let j = 0; j < n; j++) {
    if (ps[j] > 0 && !(Number.isInteger(xs[j]) && xs[j] >= 0)) natural = false;
    if (xs[j] === 0) p0 += ps[j];
  }
  // a law on 0, 1, 2, ...: log E e^{wN} = log sum_j p_j e^{w x_j}, summed about the largest real part
  const countCgf = natural
    ? (wr: Float64Array, wi: Float64Array, re: Float64Array, im: Float64Array) => {
        for (let k = 0; k < wr.length; k++) {
          let sr = 0;
          let si = 0;
          const top = wr[k] <= 0 ? lo * wr[k] : hi * wr[k];
          for (let j = 0; j < n; j++) {
            const m = ps[j] * Math.exp(xs[j] * wr[k] - top);
            sr += m * Math.cos(xs[j] * wi[k]);
            si += m * Math.sin(xs[j] * wi[k]);
          }
          re[k] = Math.log(cabs(sr, si)) + top;
          im[k] = Math.atan2(si, sr);
        }
        unwrapFrom(im, nearestZero(wr, wi));
      }
    : undefined;
  return {
    ...(countCgf ? { countCgf, p0 } : {}),
    kind: { type: "discrete", atoms },
    momentIndex: Infinity,
    tails: { left: Infinity, right: Infinity },
    nodes: 1,
    notes: [],
    location: mean,
    scale: sd || 1,
    support: [lo, hi],
    logCf(t, re, im) {
      const m = t.length;
      const dt = m > 1 ? t[1] - t[0] : 0;
      // t on a uniform grid (the inversion grids): e^{i t_k y} = e^{i t_0 y} (e^{i dt y})^k, one complex product per
      // (value, point) instead of cos and sin; re-anchored every 32 points so rounding stays below ~1e-14
      const uniformT = !equal && n * m >= 4096 && m >= 64 && dt !== 0 && t.every((x, k) => Math.abs(x - t[0] - k * dt) <= 1e-13 * Math.max(Math.abs(x), Math.abs(dt)));
      if (uniformT) {
        atomsCfUniform(xs, ps, mean, t, dt, m, re, im);
        for (let k = 0; k < m; k++) {
          const sr = re[k];
          const si = im[k];
          re[k] = Math.log(cabs(sr, si));
          im[k] = Math.atan2(si, sr);
        }
      } else for (let k = 0; k < m; k++) {
        const x = t[k];
        let sr = 0;
        let si = 0;
        if (equal) {
          const h = xs[1] - xs[0];
          const cr = Math.cos(x * h);
          const ci = Math.sin(x * h);
          let zr = 0;
          let zi = 0;
          for (let j = 0; j < n; j++) {
            if ((j & 31) === 0) {
              const a = x * (xs[0] + j * h - mean);
              zr = Math.cos(a);
              zi = Math.sin(a);
            }
            sr += ps[j] * zr;
            si += ps[j] * zi;
            const nr = zr * cr - zi * ci;
            zi = zr * ci + zi * cr;
            zr = nr;
          }
        } else {
          for (let j = 0; j < n; j++) {
            const a = x * (xs[j] - mean);
            sr += ps[j] * Math.cos(a);
            si += ps[j] * Math.sin(a);
          }
        }
        re[k] = Math.log(cabs(sr, si));
        im[k] = Math.atan2(si, sr);
      }
      const anchor = sortedAnchor(t);
      if (anchor >= 0) unwrapFrom(im, anchor);
      for (let k = 0; k < t.length; k++) im[k] += mean * t[k];
    },
    cumulants(m) {
      const central: number[] = [];
      for (let r = 1; r <= m; r++) central.push(r === 1 ? 0 : cm(r));
      const k = rawToCumulants(central);
      if (m > 0) k[0] = mean;
      return k;
    },
  };
}

/**
 * sum_j p_j e^{i t_k (x_j - mean)} for t_k = t_0 + k dt into (re, im): one complex rotation per (value, point),
 * re-anchored with cos/sin every 128 points so the rounding drift stays near 128 ulp (~3e-14). No allocation.
 */
function atomsCfUniform(xs: Float64Array, ps: Float64Array, mean: number, t: Float64Array, dt: number, m: number, re: Float64Array, im: Float64Array) {
  re.fill(0, 0, m);
  im.fill(0, 0, m);
  const n = xs.length;
  // two values per pass: two independent rotation chains keep the multiply units busy
  for (let j = 0; j < n; j += 2) {
    const y = xs[j] - mean;
    const pj = ps[j];
    const y2 = j + 1 < n ? xs[j + 1] - mean : 0;
    const p2 = j + 1 < n ? ps[j + 1] : 0;
    const cr = Math.cos(dt * y);
    const ci = Math.sin(dt * y);
    const dr = Math.cos(dt * y2);
    const di = Math.sin(dt * y2);
    for (let k0 = 0; k0 < m; k0 += 128) {
      const a = t[k0] * y;
      const b = t[k0] * y2;
      let zr = pj * Math.cos(a);
      let zi = pj * Math.sin(a);
      let wr = p2 * Math.cos(b);
      let wi = p2 * Math.sin(b);
      const k1 = Math.min(m, k0 + 128);
      for (let k = k0; k < k1; k++) {
        re[k] += zr + wr;
        im[k] += zi + wi;
        const nr = zr * cr - zi * ci;
        zi = zr * ci + zi * cr;
        zr = nr;
        const mr = wr * dr - wi * di;
        wi = wr * di + wi * dr;
        wr = mr;
      }
    }
  }
}

/**
 * Empirical law of data: mass w_i / sum(w) at values[i] (w_i = 1 without weights), equal values merged, zero-weight
 * values dropped. A lattice law when the values sit on a common lattice of moderate length, else atoms.
 */
export function sampleNode(values: number[], maxLattice: number, weights?: number[]): Node {
  const n = values.length;
  let v: Float64Array;
  let w: Float64Array | null = null;
  if (weights) {
    const vals = Float64Array.from(values);
    const order = new Uint32Array(n);
    for (let j = 0; j < n; j++) order[j] = j;
    order.sort((a, b) => vals[a] - vals[b]);
    v = new Float64Array(n);
    w = new Float64Array(n);
    for (let j = 0; j < n; j++) {
      v[j] = vals[order[j]];
      w[j] = weights[order[j]];
    }
  } else v = Float64Array.from(values).sort();
  const xsBuf = new Float64Array(n);
  const massBuf = new Float64Array(n);
  let m = 0;
  let total = 0;
  for (let j = 0; j < n; j++) {
    const wj = w ? w[j] : 1;
    if (!(wj > 0)) continue;
    total += wj;
    if (m > 0 && v[j] === xsBuf[m - 1]) massBuf[m - 1] += wj;
    else {
      xsBuf[m] = v[j];
      massBuf[m++] = wj;
    }
  }
  const xs = xsBuf.subarray(0, m);
  const mass = massBuf.subarray(0, m);
  if (xs.length === 1) return point(xs[0]);
  let g: number | null = 0;
  for (let j = 1; j < xs.length && g !== null; j++) g = commonStep(g, xs[j] - xs[0]);
  if (g !== null && g > 0) {
    const len = Math.round((xs[xs.length - 1] - xs[0]) / g) + 1;
    if (len <= maxLattice && len <= 64 * xs.length + 1024) {
      const p = new Float64Array(len);
      for (let j = 0; j < xs.length; j++) p[Math.round((xs[j] - xs[0]) / g)] += mass[j] / total;
      return latticeNode(xs[0], g, p);
    }
  }
  const ps = mass.slice();
  for (let j = 0; j < m; j++) ps[j] /= total;
  return atomsNode(xs.slice(), ps);
}
