import { runMoments } from "@/lib/api/operations";

const fmt = (v: number | null) => (v === null ? "null" : Number(v.toPrecision(8)));
const fmtErr = (v: number | null) => (v === null ? "null" : Number(v.toPrecision(2)));

/** A real request and the engine's own answer to it (computed when the page is built). */
export function LandingExample({ model, base }: { model: unknown; base: string }) {
  const body = { model, order: 3 };
  const request = `curl -s ${base}/api/v1/moments \\
  -H "Authorization: Bearer $SUMFOLD_KEY" \\
  -H "Content-Type: application/json" \\
  -d '${JSON.stringify(body, null, 1).replace(/\n\s*/g, " ")}'`;
  const r = runMoments(body);
  const answer = JSON.stringify(
    {
      mean: fmt(r.mean),
      meanError: fmtErr(r.meanError),
      variance: fmt(r.variance),
      varianceError: fmtErr(r.varianceError),
      skewness: fmt(r.skewness),
      cumulants: r.cumulants.map(fmt),
      cumulantError: r.cumulantError.map(fmtErr),
      exists: r.exists,
    },
    null,
    2,
  );
  return (
    <figure className="overflow-hidden rounded-xl border border-ink/10 bg-ink text-paper shadow-lg">
      <figcaption className="border-b border-white/10 px-4 py-2 text-xs font-semibold uppercase tracking-wider text-fold-100">
        Hail damage 2027 — 42 claims a year on average, gamma-sized
      </figcaption>
      <pre className="overflow-x-auto whitespace-pre-wrap break-all p-4 font-mono text-[12px] leading-relaxed">
        <code>{request}</code>
      </pre>
      <pre className="overflow-x-auto border-t border-white/10 bg-black/20 p-4 font-mono text-[12px] leading-relaxed text-fold-100">
        <code>{answer}</code>
      </pre>
    </figure>
  );
}
