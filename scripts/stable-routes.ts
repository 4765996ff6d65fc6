// npx tsx scripts/stable-routes.ts — how the direct route bounds each stable fixture point (tests/fixtures/stable/
// stable.json, bench-sample.json), per law: by its panels ("derived"), by a rule's value compared with panels (the
// distance plus the panels' bound, "compared": derived too) or not at all (Infinity, "none"), with the CPU time of the first
// call per law (the panels' set-up) and of a second pass over the same points.
import { readFileSync } from "node:fs";
import { stableLastRoute, stdAt } from "@/lib/cf/direct/stable";
import { tanHalfPi } from "@/lib/cf/direct/stable-kernel";
import { directPoint } from "@/lib/cf/direct/types";

interface Row {
  model: { alpha: number; beta: number; scale: number; loc: number; param: "S0" | "S1" };
  x: number;
}
const load = (n: string) => (JSON.parse(readFileSync(`tests/fixtures/stable/${n}`, "utf8")) as { points: Row[] }).points;
const main = load("stable.json");
const rows = [...main, ...load("bench-sample.json")];
const byLaw = new Map<string, Row[]>();
for (const r of rows) {
  const k = `${r.model.alpha}/${r.model.beta}/${r.model.param}`;
  byLaw.set(k, [...(byLaw.get(k) ?? []), r]);
}
const cpu = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};
let est = 0;
let cmp = 0;
let estMain = 0;
let n = 0;
const out = directPoint();
for (const [k, pts] of byLaw) {
  const { alpha, beta, scale, loc, param } = pts[0].model;
  const g = scale;
  const shift = alpha === 1 ? beta * (2 / Math.PI) * g * Math.log(g) : beta * g * tanHalfPi(alpha);
  const d1 = param === "S1" ? loc : loc - shift;
  const zs = pts.map((p) => (p.x - d1) / g);
  const c0 = cpu();
  const marks = zs.map((z) => {
    stdAt(alpha, beta, z, out);
    return stableLastRoute();
  });
  const c1 = cpu();
  for (const z of zs) stdAt(alpha, beta, z, out);
  const c2 = cpu();
  const e = marks.filter((m) => m === "none").length;
  const c = marks.filter((m) => m === "compared").length;
  estMain += pts.filter((p, i) => marks[i] === "none" && main.includes(p)).length;
  est += e;
  cmp += c;
  n += pts.length;
  const where = (m: string) => zs.filter((_, i) => marks[i] === m).map((z) => z.toPrecision(3));
  console.log(
    `${k.padEnd(18)} ${String(pts.length).padStart(3)} points, ${String(c).padStart(3)} compared, ${String(e).padStart(3)} unbounded  first ${(c1 - c0).toFixed(1)} ms, again ${(c2 - c1).toFixed(1)} ms CPU` +
      `${c ? `  compared z: ${where("compared").join(" ")}` : ""}${e ? `  unbounded z: ${where("none").join(" ")}` : ""}`,
  );
}
console.log(`${est} of ${n} points without a bound (stable.json: ${estMain} of ${main.length}); ${cmp} bounded by comparison with panels`);
