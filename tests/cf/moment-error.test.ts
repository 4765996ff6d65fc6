// The running-error arithmetic (lib/cf/moment-error.ts) against exact rational arithmetic (JavaScript BigInt, every
// double is m 2^e exactly): each operation's stated bound must cover the exact difference between the true result of
// the exact inputs and the double it returns, and a result that is exact must carry 0.
import { describe, expect, it } from "vitest";
import { add, div, exact, mul, powInt, sqrt, sub } from "@/lib/cf/moment-error";
import { cumulantEst } from "@/lib/cf/cumulant-bounds";
import { buildNode } from "@/lib/cf/compile";
import type { Node } from "@/lib/cf/node";

type Frac = { n: bigint; d: bigint };

/** the exact value of a finite double as a fraction (IEEE 754 binary64 layout) */
function frac(x: number): Frac {
  if (x === 0) return { n: 0n, d: 1n };
  const buf = new DataView(new ArrayBuffer(8));
  buf.setFloat64(0, x);
  const bits = buf.getBigUint64(0);
  const sign = bits >> 63n ? -1n : 1n;
  const expBits = Number((bits >> 52n) & 0x7ffn);
  let mant = bits & ((1n << 52n) - 1n);
  let e: number;
  if (expBits === 0) e = -1074;
  else {
    mant |= 1n << 52n;
    e = expBits - 1075;
  }
  return e >= 0 ? { n: sign * mant * (1n << BigInt(e)), d: 1n } : { n: sign * mant, d: 1n << BigInt(-e) };
}
const fsub = (a: Frac, b: Frac): Frac => ({ n: a.n * b.d - b.n * a.d, d: a.d * b.d });
const fmul = (a: Frac, b: Frac): Frac => ({ n: a.n * b.n, d: a.d * b.d });
const fdiv = (a: Frac, b: Frac): Frac => (b.n < 0n ? { n: -a.n * b.d, d: a.d * -b.n } : { n: a.n * b.d, d: a.d * b.n });
const abs = (a: Frac): Frac => ({ n: a.n < 0n ? -a.n : a.n, d: a.d });
/** a <= b for non-negative fractions */
const le = (a: Frac, b: Frac) => a.n * b.d <= b.n * a.d;

/** seeded doubles over many magnitudes (both signs) */
function* doubles(count: number, seed = 12345): Generator<number> {
  let s = seed;
  const next = () => ((s = (s * 1103515245 + 12345) % 2147483648), s / 2147483648);
  for (let i = 0; i < count; i++) yield (next() < 0.5 ? -1 : 1) * (1 + next()) * 2 ** Math.floor(next() * 80 - 40);
}

describe("running-error arithmetic covers the exact rational result (BigInt fractions)", () => {
  const xs = [...doubles(400)];
  const pairs = xs.slice(0, 200).map((a, i) => [a, xs[200 + i]] as const);

  it("a + b, a - b, a b, a / b on exact inputs: |exact - computed| <= bound, bound 0 exactly when exact", () => {
    let exactCount = 0;
    for (const [a, b] of pairs) {
      const A = frac(a);
      const B = frac(b);
      const cases: [string, ReturnType<typeof add>, Frac][] = [
        ["+", add(exact(a), exact(b)), { n: A.n * B.d + B.n * A.d, d: A.d * B.d }],
        ["-", sub(exact(a), exact(b)), fsub(A, B)],
        ["*", mul(exact(a), exact(b)), fmul(A, B)],
        ["/", div(exact(a), exact(b)), fdiv(A, B)],
      ];
      for (const [op, r, want] of cases) {
        const err = abs(fsub(want, frac(r.v)));
        expect(le(err, frac(r.e)), `${a} ${op} ${b}: computed ${r.v}, bound ${r.e}`).toBe(true);
        if (err.n === 0n) exactCount++;
        // the bound is a rounding error of the result, not a multiple of it: at most one ulp
        expect(r.e).toBeLessThanOrEqual(Math.abs(r.v) * 2 ** -51 + 2 ** -1073);
      }
    }
    expect(exactCount).toBeGreaterThan(0);
  });

  it("exact integer arithmetic carries 0 (products and quotients that are representable)", () => {
    expect(mul(exact(3), exact(7))).toEqual({ v: 21, e: 0 });
    expect(div(exact(21), exact(7))).toEqual({ v: 3, e: 0 });
    expect(powInt(exact(3), 20)).toEqual({ v: 3 ** 20, e: 0 });
    expect(add(exact(0.5), exact(0.25))).toEqual({ v: 0.75, e: 0 });
    expect(div(exact(1), exact(3)).e).toBeGreaterThan(0);
  });

  it("propagated errors: (a + da)(b + db) and sqrt stay within the stated bound for inputs anywhere in their intervals", () => {
    for (const [a, b] of pairs.slice(0, 60)) {
      const ea = Math.abs(a) * 1e-10;
      const eb = Math.abs(b) * 1e-12;
      const r = mul({ v: a, e: ea }, { v: b, e: eb });
      for (const [s1, s2] of [[1, 1], [1, -1], [-1, 1], [-1, -1]]) {
        // the interval ends a +- ea as exact fractions (a + ea in doubles would be rounded)
        const A = { n: frac(a).n * frac(ea).d + BigInt(s1) * frac(ea).n * frac(a).d, d: frac(a).d * frac(ea).d };
        const B = { n: frac(b).n * frac(eb).d + BigInt(s2) * frac(eb).n * frac(b).d, d: frac(b).d * frac(eb).d };
        const err = abs(fsub(fmul(A, B), frac(r.v)));
        expect(le(err, frac(r.e)), `(${a} +- ${ea}) * (${b} +- ${eb})`).toBe(true);
      }
      const q = sqrt({ v: Math.abs(a), e: ea });
      for (const s of [1, -1]) {
        const t = Math.abs(a) + s * 0.999 * ea; // inside the interval after rounding
        // sqrt(t) within [computed - bound, computed + bound]: compare squares exactly
        const lo = frac(q.v - q.e);
        const hi = frac(q.v + q.e);
        const T = frac(t);
        expect(le(fmul(lo, lo), T) || lo.n < 0n, `sqrt(${t}) above ${q.v - q.e}`).toBe(true);
        expect(le(T, fmul(hi, hi)), `sqrt(${t}) below ${q.v + q.e}`).toBe(true);
      }
    }
  });
});

describe("a node's running-error cumulants stay paired with its cumulants", () => {
  it("a copy that replaces cumulants without attaching new ones has no bound (Infinity), never the stale one", () => {
    const n = buildNode({ family: "gamma", shape: 2, rate: 3 });
    expect(cumulantEst(n, 3).every((c) => c !== null && Number.isFinite(c.e))).toBe(true);
    const moved: Node = { ...n, cumulants: (m) => n.cumulants(m).map((v, k) => (k === 0 && v !== null ? v + 1 : v)) };
    expect(cumulantEst(moved, 3).map((c) => c?.e)).toEqual([Infinity, Infinity, Infinity]);
  });
});
