// npx tsx scripts/damped-bound-parts.ts '<model json>' '[x1, x2, ...]' [tolerance] — the parts of the damped route's
// density bound at a few points (fewer than 32: the pointwise sums, as density() takes them for such a request), to find
// which part dominates a loose bound (npm run bench:bounds names the loose values): per point the value and its stated
// bound, and the bound's parts after undamping (times e^{beta y}, y = x - lo): the sum's truncation, its rounding from
// the CF's relative error and SUM_REL (rel sum |psi_k|), its per-node absolute noise (the atoms' subtraction, the
// kernels' rounding, the CF's absolute error), the images' uniform part and the kernels' / one-claim term's closed forms.
// Pure lib/cf; prints figures only.
import { compile } from "@/lib/cf/compile";
import { KERNEL_BUDGET, DAMPED_BUDGET, dampedSetup } from "@/lib/cf/invert/damped";
import { dampedAt, sumPdfAt, takenOutAt } from "@/lib/cf/invert/damped-eval";
import type { Atom } from "@/lib/cf/types";

const model = JSON.parse(process.argv[2]);
const xs: number[] = JSON.parse(process.argv[3]);
const tol = Number(process.argv[4] ?? 1e-10);
const c = compile(model);
const atoms: Atom[] = c.kind.type === "mixed" ? [...c.kind.atoms].sort((p, q) => p.x - q.x) : [];
const budget = c.dampedKernels?.length || c.dampedSeverity ? KERNEL_BUDGET : DAMPED_BUDGET;
const R = Math.max(...xs);
// as density-damped.ts sets up a request of fewer than 32 points
const s = dampedSetup(c, atoms, R, { tolerance: tol, wantPdf: true, budget, points: xs.length, pointwise: true, wantInt: false, transient: true, byParts: "range" });
if (!s) {
  console.log("no damped solution within the budget (the undamped route answers this model)");
  process.exit(0);
}
let absP = 0;
for (let k = 0; k < s.K; k++) absP += Math.hypot(s.pRe[k], s.pIm[k]);
const relPart = (s.h / Math.PI) * s.rel * absP;
const f = (v: number) => v.toExponential(2);
console.log(`K ${s.K}, h ${f(s.h)}, beta ${f(s.beta)}, period ${f(s.T)}; before undamping: truncation ${f(s.truncPdf)}, rounding rel ${f(relPart)} (rel ${f(s.rel)}), per-node noise ${f(s.roundPdf - relPart)}, images ${f(s.aliasPdf)}`);
for (const x of xs) {
  const v = dampedAt(s, x, true, false);
  const y = x - s.lo;
  const g = Math.exp(s.beta * y);
  const trunc = g * (sumPdfAt(s, y) - s.roundPdf * (1 + 4 * Number.EPSILON));
  const kv = takenOutAt(s, x, true, false);
  console.log(`x ${x}: pdf ${v.fc}, bound ${f(v.errf)} = truncation ${f(trunc)} + rounding rel ${f(g * relPart)} + noise ${f(g * (s.roundPdf - relPart))} + images ${f(s.aliasPdf)} + closed forms ${f(kv.errf)} + undamping`);
}
