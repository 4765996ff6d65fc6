export function LandingExample({ model }: { model: unknown }) {
  const request = `curl -s http://127.0.0.1:3000/api/v1/moments \\
  -H "Authorization: Bearer $SUMFOLD_KEY" \\
  -H "Content-Type: application/json" \\
  -d '${JSON.stringify({ model, order: 3 })}'`;
  return (
    <figure className="overflow-hidden rounded-xl border border-ink/10 bg-ink text-paper shadow-lg">
      <figcaption className="border-b border-white/10 px-4 py-2 text-xs font-semibold uppercase tracking-wider text-fold-100">
        Hail damage 2027 — 42 claims a year on average, gamma-sized
      </figcaption>
      <pre className="overflow-x-auto p-4 font-mono text-[12.5px] leading-relaxed">
        <code>{request}</code>
      </pre>
    </figure>
  );
}
