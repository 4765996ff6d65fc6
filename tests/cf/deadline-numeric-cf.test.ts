// Every computation has a deadline: laws whose CF is a quadrature per frequency (per-claim layers, beta, truncated normal) check it
// inside that loop. Before, the loop ran to its end however long it took: inverting a sum of two weibull layers
// overran a 3 s deadline by more than eight minutes and a beta law a 1 s deadline by more than a minute (found by
// tests/cf/properties-*.test.ts). Here the deadline has already passed when the CF is asked for many frequencies, so
// the loop must throw DeadlineExceeded naming its stage, without timing anything.
import { afterEach, describe, expect, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { clearDeadline, DeadlineExceeded, setDeadline } from "@/lib/cf/deadline";
import { buildNodes } from "@/lib/cf/invert/nodes";
import { makePart } from "@/lib/cf/invert/part";
import type { CompiledModel, Model } from "@/lib/cf/types";

const cases: { name: string; stage: string; model: Model }[] = [
  {
    name: "a sum of two per-claim layers of weibull claims",
    stage: "layer-cf",
    model: {
      sum: [
        { layer: { deductible: 1.648, limit: 7.196, share: 0.177 }, of: { family: "weibull", shape: 0.678, scale: 2.447 } },
        { layer: { deductible: 1.333, limit: 2.696, share: 0.526 }, of: { family: "weibull", shape: 1.72, scale: 2.818 } },
      ],
    } as Model,
  },
  { name: "a beta law on [-0.452, 2.661]", stage: "beta-cf", model: { family: "beta", alpha: 2.054, beta: 1.54, a: -0.452, b: 2.661 } as Model },
  {
    name: "a truncated normal law",
    stage: "truncated-normal-cf",
    model: { family: "truncated_normal", mu: 0.005, sigma: 1.424, lower: -2.408, upper: 1.228 } as Model,
  },
];

afterEach(() => clearDeadline());

describe("numerical CFs stop at the deadline", () => {
  for (const k of cases) {
    it(k.name, () => {
      const c = compile(k.model);
      const n = 256;
      const t = Float64Array.from({ length: n }, (_, i) => 0.25 + i / 4);
      const re = new Float64Array(n);
      const im = new Float64Array(n);
      c.logCf(t, re, im); // no deadline set: the CF answers
      expect(re.every(Number.isFinite) && im.every(Number.isFinite), `log CF not finite for ${JSON.stringify(k.model)}`).toBe(true);
      setDeadline(Date.now() - 1);
      let thrown: unknown = null;
      try {
        c.logCf(t, re, im);
      } catch (e) {
        thrown = e;
      }
      expect(thrown, `the CF of ${JSON.stringify(k.model)} ran past its deadline`).toBeInstanceOf(DeadlineExceeded);
      expect((thrown as DeadlineExceeded).stage).toBe(k.stage);
    }, 60_000);
  }
});

// The inversion evaluates the CF at millions of nodes for densities with kinks (a narrow triangular law took 14 to
// 31 s past a 150 ms deadline); it did so in one call and checked the deadline only before it. Now the nodes are
// evaluated in blocks with the deadline checked between them: a CF whose first block passes the deadline (it sets
// the deadline in the past when called) must see no second call.
describe("the inversion stops at the deadline between blocks of nodes", () => {
  it("buildNodes evaluates no further block once the deadline has passed", () => {
    const c = compile({ family: "normal", mu: 0, sigma: 1 } as Model);
    let calls = 0;
    let armed = true;
    const slow: CompiledModel = {
      ...c,
      // the inversion takes the log-CF (and exponentiates it itself, with the rounding of each value)
      logCf(t, re, im) {
        calls++;
        c.logCf(t, re, im);
        if (armed) setDeadline(Date.now() - 1);
      },
    };
    const part = makePart(slow, [], 0);
    expect(() => buildNodes(part, 1e-3, 3 << 16)).toThrow(DeadlineExceeded);
    expect(calls).toBe(1);
    clearDeadline();
    armed = false;
    calls = 0;
    const nodes = buildNodes(part, 1e-3, 3 << 16);
    clearDeadline();
    expect(nodes.K).toBe(3 << 16);
    expect(calls).toBeGreaterThanOrEqual(1);
  });
});
