/**
 * Partial moments of a Burr XII claim (log-logistic: alpha = 1) at an order j at or past its tail index alpha gamma,
 * over a bounded interval, with a derived bound (an inverse gamma claim's at the end of the file). There E X^j is infinite and the regularised incomplete beta of
 * ./layer-moments-transformed.ts has q = alpha - j/gamma <= 0, but a limited layer's partial moment is finite:
 *   M_j(a, b) = alpha theta^j  int_{v(a)}^{v(b)} v^{p-1} (1 - v)^{q-1} dv,   p = 1 + j/gamma,  v(x) = U/(1 + U),  U = (x/theta)^gamma
 * (V = U/(1 + U) is Beta(1, alpha): its density alpha (1 - v)^{alpha-1} times X^j = theta^j (v/(1 - v))^{j/gamma}).
 * The same integral serves any bounded interval with 0 < q <= 1 (the caller uses it there too: tighter than the
 * regularised incomplete beta times E X^j when Gamma(q) is large). It goes by two convergent series, split at v = 1/2:
 * - v <= 1/2: (1 - v)^{-m} = sum_k C(m + k - 1, k) v^k with m = 1 - q, every term positive (no cancellation); the
 *   terms' ratio is at most max((m + k)/(k + 1), 1) v_top, so the tail after a term is bounded geometrically.
 * - w = 1 - v <= 1/2: (1 - w)^{p-1} = sum_k C(p - 1, k) (-w)^k against w^{q-1}; past k >= p - 1 the coefficients
 *   shrink, and int w^{q+k} <= w_top int w^{q+k-1}, so the tail is at most |term| w_top / (1 - w_top).
 * Each term is C_k int_{x1}^{x2} x^{s-1} dx, taken from its larger end as x^s (-expm1(-|s| L)) / |s| (L = ln(x2/x1);
 * ln(x2/x1) itself at s = 0), whose rounding is at most (12 + 2/L) u relative with library functions at 2 ulp
 * (as ../moment-error.ts takes them); the coefficients' recurrence adds 3 u a step and the summation n u of the sum of
 * magnitudes (Higham, Accuracy and Stability, 2nd ed., eq. (4.4)).
 * The interval's ends are themselves rounded (v and w are estimates): the integrand is monotone (p >= 1, q <= 1: rising
 * in v, falling in w), so an end's error e moves the integral by at most e times the integrand at the end's worst side.
 * Rounded shapes: |dI/dq| <= |ln w_min| I and |dI/dp| <= |ln v_min| I (the integrand times ln(1 - v) or ln v), with the
 * factor x^{-delta} for the shape's move delta; at v_min = 0 the p-derivative is bounded by the closed form
 * int_0^x (-ln v) v^{c-1} dv = x^c (1/c^2 - ln(x)/c) times the largest (1 - v)^{q-1}.
 */
import { add, div, exact, gammaE, mul, powInt, type Est } from "../moment-error";
import { INF_E } from "./layer-moments";

const U = 2 ** -53;
/** one ulp of slack on a bound computed in floating point */
const UP = 1 + 2 ** -40;
/** a series longer than this is refused (it never is for the shapes the notation allows: the ratio is <= 1/2 soon) */
const MAX_TERMS = 5000;

/** int_{x1}^{x2} x^{s-1} dx (0 <= x1 < x2) and its relative rounding in units of u; Infinity where it diverges */
function powerIntegral(s: number, x1: number, x2: number): { v: number; r: number } {
  if (x1 === 0) return s > 0 ? { v: Math.pow(x2, s) / s, r: 12 } : { v: Infinity, r: 0 };
  const L = Math.log(x2 / x1);
  if (!(L > 0)) return { v: 0, r: 0 };
  const r = 12 + 2 / L;
  if (s === 0) return { v: L, r };
  // from the larger end: x2^s (1 - (x1/x2)^s) / s for s > 0, x1^s (1 - (x2/x1)^s) / |s| for s < 0
  const v = s > 0 ? (Math.pow(x2, s) * -Math.expm1(-s * L)) / s : (Math.pow(x1, s) * -Math.expm1(s * L)) / -s;
  return { v, r };
}

/** a series' value and absolute bound (truncation plus rounding) */
interface Series {
  v: number;
  e: number;
}

/** int_{x1}^{x2} v^{p-1} (1 - v)^{-m} dv for 0 <= x1 < x2 <= 1/2, p > 0 (module comment) */
function headSeries(p: number, m: number, x1: number, x2: number): Series {
  if (!(x2 > x1)) return { v: 0, e: 0 };
  let c = 1;
  let sum = 0;
  let mag = 0;
  let err = 0;
  for (let k = 0; k < MAX_TERMS; k++) {
    const t = powerIntegral(p + k, x1, x2);
    const term = c * t.v;
    if (!Number.isFinite(term)) return { v: NaN, e: Infinity };
    sum += term;
    mag += Math.abs(term);
    err += Math.abs(term) * (t.r + 3 * k + 2) * U;
    // the later terms' ratio is at most R (module comment)
    const R = Math.max((m + k) / (k + 1), 1) * x2;
    if (R < 1) {
      const tail = (Math.abs(term) * R) / (1 - R);
      if (tail <= U * Math.abs(sum)) return { v: sum, e: (err + tail * 1.01 + (k + 1) * U * mag) * UP };
    }
    c *= (m + k) / (k + 1);
  }
  return { v: NaN, e: Infinity };
}

/** int_{w1}^{w2} (1 - w)^{a} w^{q-1} dw for 0 < w1 < w2 <= 1/2, a >= 0 (module comment) */
function tailSeries(a: number, q: number, w1: number, w2: number): Series {
  if (!(w2 > w1) || !(w1 > 0)) return w2 > w1 ? { v: NaN, e: Infinity } : { v: 0, e: 0 };
  let c = 1;
  let sum = 0;
  let mag = 0;
  let err = 0;
  for (let k = 0; k < MAX_TERMS; k++) {
    const t = powerIntegral(q + k, w1, w2);
    const term = c * t.v;
    if (!Number.isFinite(term)) return { v: NaN, e: Infinity };
    sum += term;
    mag += Math.abs(term);
    err += Math.abs(term) * (t.r + 3 * k + 2) * U;
    c *= (k - a) / (k + 1);
    if (c === 0) return { v: sum, e: (err + (k + 1) * U * mag) * UP };
    if (k >= a) {
      const tail = (Math.abs(term) * w2) / (1 - w2);
      if (tail <= U * Math.abs(sum)) return { v: sum, e: (err + tail * 1.01 + (k + 1) * U * mag) * UP };
    }
  }
  return { v: NaN, e: Infinity };
}

/**
 * M_j(a, b) of Burr XII(alpha, gamma, theta) for a finite b, any order j >= 1 (module comment); v and w are the ends'
 * V = U/(1 + U) and W = 1/(1 + U) as estimates (./layer-moments-transformed.ts computes them)
 */
export function burrPartialBounded(alpha: number, gamma: number, theta: number, j: number, ends: { va: Est; wa: Est; vb: Est; wb: Est }): Est {
  const { va, wa, vb, wb } = ends;
  if (!(wb.v > 0) || !Number.isFinite(va.e + wa.e + vb.e + wb.e)) return INF_E;
  const r = div(exact(j), exact(gamma));
  const p = add(exact(1), r);
  const q = add(exact(alpha), { v: -r.v, e: r.e });
  const a1 = p.v - 1;
  const m = 1 - q.v;
  if (!(q.v <= 1) || !(p.v >= 1)) return INF_E;
  // the integral split at v = 1/2; each end in the variable it is taken in, with its error's move
  const parts: Series[] = [];
  const integrandV = (v: number) => Math.pow(v, p.v - 1) * Math.pow(1 - v, q.v - 1);
  const integrandW = (w: number) => Math.pow(1 - w, a1) * Math.pow(w, q.v - 1);
  let endMove = 0;
  if (vb.v <= 0.5) {
    parts.push(headSeries(p.v, m, va.v, vb.v));
    endMove += 2 * integrandV(Math.min(vb.v + vb.e, 0.75)) * vb.e + 2 * integrandV(Math.min(va.v + va.e, 0.75)) * va.e;
    if (vb.v + vb.e > 0.75 || va.v + va.e > 0.75) return INF_E;
  } else if (va.v >= 0.5) {
    parts.push(tailSeries(a1, q.v, wb.v, wa.v));
    if (!(wb.v - wb.e > 0) || !(wa.v - wa.e > 0)) return INF_E;
    endMove += 2 * integrandW(wb.v - wb.e) * wb.e + 2 * integrandW(wa.v - wa.e) * wa.e;
  } else {
    parts.push(headSeries(p.v, m, va.v, 0.5), tailSeries(a1, q.v, wb.v, 0.5));
    if (!(wb.v - wb.e > 0) || va.v + va.e > 0.75) return INF_E;
    endMove += 2 * integrandW(wb.v - wb.e) * wb.e + 2 * integrandV(Math.min(va.v + va.e, 0.75)) * va.e;
  }
  let I = 0;
  let e = endMove;
  for (const s of parts) {
    I += s.v;
    e += s.e + U * Math.abs(I);
  }
  if (!Number.isFinite(I) || !Number.isFinite(e)) return INF_E;
  // the shapes' rounding (module comment)
  const Iabs = Math.abs(I) + e;
  const wMin = wb.v - wb.e;
  if (q.e > 0) e += q.e * Math.abs(Math.log(wMin)) * Math.pow(wMin, -q.e) * Iabs * 1.01;
  if (p.e > 0) {
    const vMin = va.v - va.e;
    if (vMin > 0) e += p.e * Math.abs(Math.log(vMin)) * Math.pow(vMin, -p.e) * Iabs * 1.01;
    else {
      const c = p.v - p.e;
      const x = Math.min(vb.v + vb.e, 1);
      e += p.e * Math.pow(x, c) * (1 / (c * c) + Math.abs(Math.log(x)) / c) * Math.pow(wMin, q.v - 1 - q.e) * 1.01;
    }
  }
  const pre = mul(exact(alpha), powInt(exact(theta), j));
  return mul(pre, { v: I, e: e * UP });
}

/**
 * int_{g1}^{g2} g^{s-1} e^{-g} dg for 0 < g1 < g2 <= Infinity and s <= 1, with its bound: the inverse gamma claim's
 * partial moment at an order at or past its index (s = alpha - j <= 0), where Gamma(s) has no regularised form.
 * - g <= 1: e^{-g} = sum_k (-g)^k / k! against g^{s-1}; the terms' ratio is at most g_top / (k + 1).
 * - g >= 1: panels [c, c + h], h <= c/4: g^{s-1} = c^{s-1} sum_k C(s - 1, k) (t/c)^k against int_0^h t^k e^{-t} dt
 *   = e^{-h} h^{k+1}/(k + 1) sum_i h^i (k+1)!/(k+1+i)! (positive terms); the ratio of the panel's terms is at most
 *   (1 + |s|/(k + 1)) h/c. Past the last panel, int_C^inf g^{s-1} e^{-g} <= C^{s-1} e^{-C} (g^{s-1} <= C^{s-1}).
 */
function gammaKernelIntegral(s: number, g1: number, g2: number): Series {
  if (!(g2 > g1) || !(g1 > 0) || !(s <= 1)) return { v: NaN, e: Infinity };
  let v = 0;
  let e = 0;
  // head: g in [g1, min(g2, 1)]
  if (g1 < 1) {
    const x2 = Math.min(g2, 1);
    let c = 1;
    let sum = 0;
    let mag = 0;
    let err = 0;
    let done = false;
    for (let k = 0; k < MAX_TERMS; k++) {
      const t = powerIntegral(s + k, g1, x2);
      const term = c * t.v;
      if (!Number.isFinite(term)) return { v: NaN, e: Infinity };
      sum += term;
      mag += Math.abs(term);
      err += Math.abs(term) * (t.r + 3 * k + 2) * U;
      const R = x2 / (k + 2);
      const tail = (Math.abs(term) * R) / (1 - R);
      if (tail <= U * Math.abs(sum)) {
        err += tail * 1.01 + (k + 1) * U * mag;
        done = true;
        break;
      }
      c *= -1 / (k + 1);
    }
    if (!done) return { v: NaN, e: Infinity };
    v += sum;
    e += err;
  }
  // body: panels from max(g1, 1)
  let c = Math.max(g1, 1);
  for (let panel = 0; panel < MAX_TERMS && c < g2; panel++) {
    // what is left past c is at most c^{s-1} e^{-c}: stop once it is below the sum's last digit
    const rest = Math.pow(c, s - 1) * Math.exp(-c);
    if (g2 === Infinity && rest <= U * Math.abs(v)) {
      e += rest * 1.01;
      return { v, e: (e + U * Math.abs(v)) * UP };
    }
    const next = Math.min(c + c / 4, g2);
    const h = next - c; // exact: next <= 2c
    const pre = rest; // c^{s-1} e^{-c}
    let coef = 1; // C(s - 1, k) / c^k
    let sum = 0;
    let mag = 0;
    let err = 0;
    let done = false;
    const eh = Math.exp(-h);
    let hk1 = h; // h^{k+1}
    for (let k = 0; k < MAX_TERMS; k++) {
      // G_k = int_0^h t^k e^{-t} dt = e^{-h} h^{k+1}/(k + 1) S_k, S_k = sum_i h^i (k+1)!/(k+1+i)! <= e^h
      let Sk = 1;
      let term = 1;
      let i = 0;
      for (; i < MAX_TERMS; i++) {
        term *= h / (k + 2 + i);
        Sk += term;
        if (term <= U * Sk * (1 - h / (k + 3 + i))) break;
      }
      // the series' remainder after term i is at most term h/(k + 3 + i) / (1 - h/(k + 3 + i))
      const q = h / (k + 3 + i);
      const Gk = (eh * hk1 * Sk * (1 + (term * q) / (1 - q) / Sk)) / (k + 1);
      const b = coef * Gk;
      sum += b;
      mag += Math.abs(b);
      err += Math.abs(b) * (3 * i + 4 * k + 20) * U + Math.abs(coef) * ((eh * hk1 * term * q) / (1 - q) / (k + 1));
      const R = ((1 + Math.abs(s) / (k + 1)) * h) / c;
      if (R < 1) {
        const tail = (Math.abs(b) * R) / (1 - R);
        if (tail <= U * Math.abs(sum)) {
          err += tail * 1.01 + (k + 1) * U * mag;
          done = true;
          break;
        }
      }
      coef *= (s - 1 - k) / ((k + 1) * c);
      hk1 *= h;
    }
    if (!done || !Number.isFinite(sum)) return { v: NaN, e: Infinity };
    v += pre * sum;
    e += pre * (err + 12 * U * Math.abs(sum));
    c = next;
  }
  if (c < g2) return { v: NaN, e: Infinity };
  return { v, e: (e + U * Math.abs(v)) * UP };
}

/**
 * M_j(a, b) of inverse gamma(alpha, theta) for a finite b, any order j >= 1: theta^j / Gamma(alpha) int_{theta/b}^{theta/a}
 * g^{s-1} e^{-g} dg with s = alpha - j (G = theta/X is Gamma(alpha, 1)); za, zb the ends theta/a, theta/b as estimates
 */
export function inverseGammaPartialBounded(alpha: number, theta: number, j: number, za: Est, zb: Est): Est {
  const s = add(exact(alpha), exact(-j));
  if (!(s.v <= 1) || !(zb.v > 0) || !Number.isFinite(zb.e) || !(zb.v - zb.e > 0)) return INF_E;
  const top = za.v;
  if (top !== Infinity && !(Number.isFinite(za.e) && za.v - za.e > 0)) return INF_E;
  const I = gammaKernelIntegral(s.v, zb.v, top);
  if (!Number.isFinite(I.v) || !Number.isFinite(I.e)) return INF_E;
  // the ends' rounding: the integrand falls (s <= 1), so its largest over [z - e, z + e] is at z - e
  const kernel = (g: number) => Math.pow(g, s.v - 1) * Math.exp(-g);
  let e = I.e + 2 * kernel(zb.v - zb.e) * zb.e + (top === Infinity ? 0 : 2 * kernel(za.v - za.e) * za.e);
  // a rounded shape: |dI/ds| <= |ln min(z_b, 1)| I + int_1^inf ln(g) g^{s-1} e^{-g} dg, the last <= int_1^inf g e^{-g} dg = 2/e < 1
  // (ln g <= g, s <= 1), times g^{-delta} for the move delta
  if (s.e > 0) e += s.e * (Math.abs(Math.log(Math.min(zb.v - zb.e, 1))) * (I.v + I.e) + 1) * Math.pow(Math.min(zb.v - zb.e, 1), -s.e) * 1.01;
  const pre = div(powInt(exact(theta), j), gammaE(alpha));
  return mul(pre, { v: I.v, e: e * UP });
}
