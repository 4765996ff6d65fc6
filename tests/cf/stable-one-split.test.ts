// The stable law with alpha = 1 and beta != 0 far in both tails, its tail split into completely monotone parts
// (lib/cf/direct/stable-one-tail.ts oneTailSplit, reached through DirectLaw.monotoneSplit) and the accelerated image sums
// that rest on it (lib/cf/invert/images.ts), against mpmath at 30 digits (tests/fixtures/stable-one/generate.py: the
// density and tails by the contour integral down the imaginary axis and along Im t = -1, checked by Nolan's (1997)
// integral integrated by parts; the split's reference sizes as the Laplace transforms of |Im e^w| (tanh-sinh, checked by
// Gauss-Legendre at 40 digits) and the sums of the contour's second piece along the progression; the image sums by
// Levin's u-transform, checked by Wynn's epsilon transform).
import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { compile } from "@/lib/cf/compile";
import { directPoint } from "@/lib/cf/direct/types";
import { oneTailSplit } from "@/lib/cf/direct/stable-one-tail";
import { imageLadder, imageScratch } from "@/lib/cf/invert/images";
import type { Model } from "@/lib/cf/types";

interface Fixture {
  points: { beta: number; z: number; pdf: string; cdf: string; sf: string; rel_diff: number }[];
  splits: { b: number; z: number; step: number; pdf: string; sf: string; abs_laplace_pdf: string; abs_laplace_sf: string; rest_pdf: string; rest_sf: string; abs_check: number }[];
  images: { model: Model & { beta: number; scale: number; loc: number }; x: number; T0: number; values: { level: number; cdf: string; pdf: string; rel_diff: number }[] }[];
}
const F = JSON.parse(readFileSync(new URL("../fixtures/stable-one/stable-one.json", import.meta.url), "utf8")) as Fixture;
const std = (beta: number) => compile({ family: "stable", alpha: 1, beta, scale: 1, loc: 0, param: "S1" } as Model).direct!;
/** the 25 written digits and the two methods' difference */
const refErr = (v: number, rel: number) => (rel + 1e-24) * Math.abs(v) + 1e-300;

function within(what: string, got: number, bound: number, ref: number, rel: number) {
  const diff = Math.abs(got - ref);
  if (!(diff <= bound + refErr(ref, rel))) expect.fail(`${what}: engine ${got}, reference ${ref}, difference ${diff.toExponential(3)} above the bound ${bound.toExponential(3)}`);
}

describe("alpha = 1, beta != 0 far in both tails (the direct law)", () => {
  it.each(F.points.map((p) => [p.beta, p.z, p] as const))("beta %f at z = %f: pdf, cdf and sf within their bounds, the bounds at most 1e-10 relative", (beta, z, p) => {
    const pt = directPoint();
    std(beta).at(z, pt);
    const tail = z > 0 ? Number(p.sf) : Number(p.cdf);
    within(`pdf`, pt.pdf, pt.pdfErr, Number(p.pdf), p.rel_diff);
    within(`cdf`, pt.cdf, pt.cdfErr, Number(p.cdf), p.rel_diff);
    within(`sf`, pt.sf, pt.sfErr, Number(p.sf), p.rel_diff);
    expect(pt.pdfErr, "the density's bound").toBeLessThanOrEqual(1e-10 * Number(p.pdf));
    expect(z > 0 ? pt.sfErr : pt.cdfErr, "the far tail's bound").toBeLessThanOrEqual(1e-10 * tail);
  });
});

describe("alpha = 1 tail split (oneTailSplit): its sizes bound the completely monotone part and the rest", () => {
  it.each(F.splits.map((s) => [s.b, s.z, s.step, s] as const))("skewness %f at z = %f, step %f", (b, z, step, s) => {
    const r = oneTailSplit(b, z, step);
    if (!r) return expect.fail(`no split at b ${b}, z ${z}`);
    const info = (what: string, got: number, ref: number) => `${what}: engine ${got.toExponential(6)}, reference ${ref.toExponential(6)} (b ${b}, z ${z}, step ${step})`;
    // the sizes are upper bounds on the Laplace piece's |g| transforms (the reference to its check's difference)...
    const lp = Number(s.abs_laplace_pdf) * (1 - s.abs_check - 1e-20);
    const ls = Number(s.abs_laplace_sf) * (1 - s.abs_check - 1e-20);
    expect(r.pdf, info("pdf size", r.pdf, lp)).toBeGreaterThanOrEqual(lp);
    expect(r.tail, info("tail size", r.tail, ls)).toBeGreaterThanOrEqual(ls);
    // ...and not loose: the sizes replace |Im e^w| = e^(Re w) |sin((1 + b) r)| by e^(|B|/e) (1 + b) r, a factor of at
    // most e^(2/(pi e)) = 1.27 near r = 0 (|B| <= 2/pi), where e^(-zr) puts nearly all the weight once z >= 30
    expect(r.tail, info("tail size (tightness)", r.tail, ls)).toBeLessThanOrEqual(2 * ls);
    expect(r.pdf, info("pdf size (tightness)", r.pdf, lp)).toBeLessThanOrEqual(2 * lp);
    // the rest's sums along z + m step
    const rp = Number(s.rest_pdf) * (1 - 1e-20);
    const rs = Number(s.rest_sf) * (1 - 1e-20);
    expect(r.restPdf, info("rest (pdf)", r.restPdf, rp)).toBeGreaterThanOrEqual(rp);
    expect(r.restTail, info("rest (tail)", r.restTail, rs)).toBeGreaterThanOrEqual(rs);
    // the law's values at z itself are the two pieces: within the sizes plus the rest
    expect(Number(s.sf), info("sf within tail + rest", r.tail + r.restTail, Number(s.sf))).toBeLessThanOrEqual(r.tail + r.restTail);
    expect(Number(s.pdf), info("pdf within size + rest", r.pdf + r.restPdf, Number(s.pdf))).toBeLessThanOrEqual(r.pdf + r.restPdf);
  });

  it.each(F.splits.map((s) => [s.b, s.z, s] as const))("skewness %f at z = %f: the law's split on either side is oneTailSplit's (left tail: skewness -beta)", (b, z, s) => {
    const right = std(b).monotoneSplit!(z, 1, s.step, false);
    const left = std(-b).monotoneSplit!(-z, -1, s.step, false);
    const ref = Number(s.abs_laplace_sf) * (1 - s.abs_check - 1e-20);
    for (const [side, r] of [
      ["right", right],
      ["left", left],
    ] as const) {
      if (!r) return expect.fail(`no ${side} split at b ${b}, z ${z}`);
      expect(r.tail, `${side} tail size against |g| transform ${ref}`).toBeGreaterThanOrEqual(ref);
      expect(r.restTail, `${side} rest`).toBeGreaterThanOrEqual(Number(s.rest_sf) * (1 - 1e-20));
      expect(r.stopLoss, `${side}: no stop-loss size (no mean)`).toBe(Infinity);
    }
  });
});

describe("image sums of alpha = 1, beta != 0 laws (images.ts) vs mpmath", () => {
  it.each(F.images.map((c) => [JSON.stringify(c.model), c.x, c.T0, c] as const))("%s x = %f T0 = %f", (_m, x, T0, c) => {
    const law = compile(c.model).direct!;
    const levels = Math.max(...c.values.map((v) => v.level)) + 1;
    for (const split of [true, false]) {
      const r = imageLadder(split ? law : { ...law, monotoneSplit: undefined }, x, T0, levels, imageScratch());
      for (const v of c.values) {
        const got = r[v.level];
        // the split's rest beside the completely monotone part (the contour's second piece, (2/pi) e^(|B| - z) at each
        // image), counted twice by images.ts: where the first image is as near as z = 24.5 it alone is ~5e-11
        const T = T0 * 2 ** v.level;
        const rest = (k: "restTail" | "restPdf") => 2 * (law.monotoneSplit!(x + T, 1, T, false)![k] + law.monotoneSplit!(x - T, -1, T, false)![k]);
        for (const [what, value, bound, ref] of [
          ["cdf", got.cdf, got.errCdf, Number(v.cdf)],
          ["pdf", got.pdf, got.errPdf, Number(v.pdf)],
        ] as const) {
          const tag = `${what} at T ${T} (${split ? "split" : "brackets"})`;
          within(tag, value, bound, ref, v.rel_diff);
          // with the split the rest of the bound (the law's own errors, the acceleration's) is below 1e-13
          if (split) expect(bound, `${tag}: bound`).toBeLessThanOrEqual(1e-13 + rest(what === "cdf" ? "restTail" : "restPdf") * (1 + 1e-12));
          else if (what === "cdf") expect(bound, `${tag}: bound`).toBeLessThanOrEqual(1e-4);
        }
      }
    }
  });
});
