// The caution shown wherever results could inform capital, reserving, pricing or safety decisions.
export function Caution({ className = "" }: { className?: string }) {
  return (
    <p role="note" className={`rounded-md border border-caution-500/40 bg-caution-50 px-4 py-3 text-sm text-caution-700 ${className}`}>
      <strong className="font-semibold">Caution.</strong> Sumfold&rsquo;s results are computational aids. Capital, reserving,
      pricing and safety-tolerance decisions rest with licensed practice and local regulation.
    </p>
  );
}
