// The lattice table of a compound whose severity has points below 0 (Panjer's recursion needs them at or above 0):
// sum_k P(N = k) X^{*k} over the count's short table, each power whole (no cut), with per-entry bounds.
import type { LatticeTable } from "./types";
import { checkDeadline } from "./deadline";
import { convolveDirect } from "./lattice";
import { convolvedPointErr, pointErrOf } from "./table-rounding";

const U = Number.EPSILON / 2;

/**
 * S = sum_{k <= K} P(N = k) X^{*k} for a severity table sev on g Z from o g (o < 0; its dropped mass 0) and a count
 * table nt on 0..K (its dropped mass at most 1e-16, which the result drops: tailMass), where the whole support, K span + 1
 * points, fits in maxLength: X^{*k} by direct convolutions, each with its per-entry bounds (./table-rounding.ts
 * convolvedPointErr), placed at k o. Each entry a sum of at most K + 1 products w_k x_k (non-negative), within
 * gamma_{K+2} of itself (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., sec. 3.1), plus the inputs'
 * errors sum_k w_k e(x_k) + e(w_k) (x_k + e(x_k)). Null where an input has no per-entry bounds, the support does not fit or
 * the products would cost more than 5e7 operations.
 */
export function signedCompoundTable(nt: LatticeTable, sev: LatticeTable, o: number, g: number, maxLength: number): LatticeTable | null {
  const sevErr = pointErrOf(sev);
  const nErr = pointErrOf(nt);
  if (!sevErr || !nErr || sev.tailMass !== 0 || !(nt.tailMass <= 1e-16) || nt.origin < 0 || nt.step !== 1 || !Number.isInteger(nt.origin)) return null;
  const K = nt.origin + nt.p.length - 1;
  const span = sev.p.length - 1;
  const lo = Math.min(0, K * o);
  const hi = Math.max(0, K * (o + span));
  const len = hi - lo + 1;
  // (the direct products cost about K^2 span (span + 1) / 2: past 5e7 the FFT of the CF is cheaper)
  if (!(len <= maxLength) || (K * K * span * (span + 1)) / 2 > 5e7) return null;
  const out = new Float64Array(len);
  const err = new Float64Array(len);
  let cur: Float64Array = Float64Array.of(1);
  let curErr: Float64Array = Float64Array.of(0);
  for (let k = 0; k <= K; k++) {
    checkDeadline("compound-table");
    if (k > 0) {
      const c = convolveDirect(cur, sev.p);
      curErr = convolvedPointErr(cur, sev.p, curErr, sevErr, c, c.length);
      cur = c;
    }
    if (k < nt.origin) continue;
    const w = nt.p[k - nt.origin];
    const ew = nErr[k - nt.origin];
    const off = k * o - lo;
    for (let i = 0; i < cur.length; i++) {
      out[off + i] += w * cur[i];
      err[off + i] += w * curErr[i] + ew * (Math.abs(cur[i]) + curErr[i]);
    }
  }
  const G = ((K + 2) * U) / (1 - (K + 2) * U);
  const G2 = ((3 * K + 6) * U) / (1 - (3 * K + 6) * U);
  let pmf = 0;
  let l1 = 0;
  for (let i = 0; i < len; i++) {
    // (err's own sums, of non-negative terms, rounded up by G2)
    err[i] = (err[i] * (1 + G2) + G * Math.abs(out[i]) * (1 + 2 * G)) * (1 + 4 * U);
    if (err[i] > pmf) pmf = err[i];
    l1 += err[i];
  }
  return { origin: lo * g, step: g, p: out, tailMass: nt.tailMass, pointErr: err, round: { pmf, l1: l1 * (1 + (len + 2) * Number.EPSILON) } };
}
