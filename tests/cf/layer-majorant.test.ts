import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, it } from "vitest";
import { compile } from "@/lib/cf/compile";
import { makePart } from "@/lib/cf/invert/part";
import { envelopeOf, probeEnvelope } from "@/lib/cf/invert/nodes";
import type { Atom, Model } from "@/lib/cf/types";
import { Checker } from "./invert-helpers";

// The continuous part of per-claim layers c min((X - d)_+, l): |int_p^q f(x) e^{i t c (x - d)} dx| on [p, q] =
// [max(d, lo), d + l] from tests/fixtures/cf-abs/generate.py (CASESET=layer: mpmath quad at 30 digits, cross-checked with
// scipy.integrate.quad's Fourier weight; the difference is in each row). The majorant is derived in lib/cf/layer-majorant.ts;
// it must be at least the reference at every grid point s >= t (less the cross-check difference), and its tail power
// must hold on the grid.
interface Row {
  t: number;
  abs: number;
  absDiff: number;
}
const fixture = JSON.parse(readFileSync(join(__dirname, "../fixtures/cf-abs/cf-abs-layer.json"), "utf8")) as { source: string; cases: { model: Model; rows: Row[] }[] };
const atomsOf = (m: ReturnType<typeof compile>): Atom[] => (m.kind.type === "mixed" ? [...m.kind.atoms].sort((p, q) => p.x - q.x) : []);

describe(`per-claim layers: majorant of the continuous part (reference: ${fixture.source})`, () => {
  for (const cs of fixture.cases) {
    it(`${JSON.stringify(cs.model)}: M(t) >= |phi_cont(s)| for grid s >= t, and the tail power holds`, () => {
      const m = compile(cs.model);
      const c = new Checker();
      const cm = m.continuousMajorant;
      c.that("has a continuous-part majorant", !!cm);
      if (!cm) return c.done();
      c.that("its atoms are the law's", cm.atoms.length === atomsOf(m).length, `${JSON.stringify(cm.atoms)} vs ${JSON.stringify(atomsOf(m))}`);
      const t = Float64Array.from(cs.rows.map((r) => r.t));
      const lm = new Float64Array(t.length);
      cm.maj(t, lm);
      let sup = 0;
      for (let i = t.length - 1; i >= 0; i--) {
        const ref = (r: Row) => r.abs - r.absDiff;
        sup = Math.max(sup, ref(cs.rows[i]));
        c.that(`M(${t[i]})`, Math.exp(lm[i]) >= sup, `M ${Math.exp(lm[i])} below sup |phi_cont| ${sup}`);
        const tail = cm.maj.tail!(t[i]);
        for (let j = i; j < t.length; j++) {
          const b = Math.exp(tail.log) * Math.pow(t[i] / t[j], tail.q);
          c.that(`tail from ${t[i]} at ${t[j]}`, b >= ref(cs.rows[j]), `bound ${b} (q ${tail.q}) below |phi_cont| ${cs.rows[j].abs}`);
        }
      }
      c.done();
    });
  }
});

// A layer of a uniform(0, 10) claim with deductible 1 and limit L: its continuous part is uniform on (0, L) with mass L / 10,
// so the inverted part (atoms at 0 and L taken out, divided by its mass) has |phi_part(s)| = |sin(L s / 2) / (L s / 2)|
// (the uniform CF, common practice). L = 22 pi / t_112 (t_i = 1e-3 2^{i/8}, the envelope probes at scale 1) puts t_112,
// t_113 and t_114 within a few per cent of zeros of the sine (11, 12 and 13.1 half-turns): the sampled envelope misses the
// peaks between them, the derived one must not.
describe("layer envelope with its atoms taken out (reference: the uniform CF in closed form)", () => {
  const L = (22 * Math.PI) / (1e-3 * Math.pow(2, 112 / 8));
  const model = { layer: { deductible: 1, limit: L }, of: { family: "uniform", a: 0, b: 10 } } as unknown as Model;
  const absPart = (s: number) => Math.abs(Math.sin(0.5 * L * s) / (0.5 * L * s));

  it("sampled misses the peaks between t_112 and t_115; the derived envelope bounds sup |phi_part| over [t_i, inf)", () => {
    const m = compile(model);
    const atoms = atomsOf(m);
    const c = new Checker();
    c.that("two atoms", atoms.length === 2, JSON.stringify(atoms));
    const e = probeEnvelope(makePart(m, atoms, 0), 1);
    const n = e.t.length;
    // the sup over [t_i, inf) on a dense grid (400 points per probe interval), from the right; past the probes |phi_part|
    // <= 2 / (L s), below 1e-12 there
    const sup = new Float64Array(n);
    let run = 0;
    for (let i = n - 2; i >= 0; i--) {
      for (let j = 0; j <= 400; j++) run = Math.max(run, absPart(e.t[i] + ((e.t[i + 1] - e.t[i]) * j) / 400));
      sup[i] = run;
    }
    const sampled = envelopeOf(e.t, Float64Array.from(e.t, absPart), () => 0);
    for (const i of [112, 113, 114]) c.that(`sampled at t_${i} below sup`, sampled.env[i] < sup[i], `sampled ${sampled.env[i]}, sup ${sup[i]}`);
    for (let i = 0; i < n - 1; i++) c.that(`env at t_${i} = ${e.t[i]}`, e.env[i] >= sup[i], `env ${e.env[i]} below sup |phi_part| ${sup[i]}`);
    // the cdf tail is finite (tail power 1), the pdf tail is not (the part's density jumps at both ends)
    c.that("cdf tail finite", Number.isFinite(e.tailCdf[0]), String(e.tailCdf[0]));
    c.that("pdf tail infinite", e.tailPdf[0] === Infinity, String(e.tailPdf[0]));
    c.done();
  });
});
