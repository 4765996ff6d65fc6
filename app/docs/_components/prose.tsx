import type { ReactNode } from "react";

export function Prose({ children }: { children: ReactNode }) {
  return (
    <article className="min-w-0 max-w-3xl space-y-4 [overflow-wrap:anywhere] leading-relaxed text-ink-soft [&_code]:rounded [&_code]:bg-paper-warm [&_code]:px-1 [&_code]:font-mono [&_code]:text-[0.9em] [&_h1]:font-display [&_h1]:text-3xl [&_h1]:font-semibold [&_h1]:text-ink [&_h2]:mt-8 [&_h2]:font-display [&_h2]:text-xl [&_h2]:font-semibold [&_h2]:text-ink [&_h3]:mt-5 [&_h3]:font-semibold [&_h3]:text-ink [&_table]:w-full [&_table]:text-sm [&_td]:border-b [&_td]:border-paper-line [&_td]:py-1.5 [&_td]:pr-3 [&_td]:align-top [&_th]:border-b [&_th]:border-ink/20 [&_th]:py-1.5 [&_th]:pr-3 [&_th]:text-left [&_ul]:list-disc [&_ul]:pl-5">
      {children}
    </article>
  );
}

export function Code({ children, label }: { children: string; label?: string }) {
  return (
    <figure className="overflow-hidden rounded-lg border border-ink/10 bg-ink text-paper">
      {label ? <figcaption className="border-b border-white/10 px-3 py-1.5 text-xs font-semibold text-fold-100">{label}</figcaption> : null}
      <pre className="overflow-x-auto p-3 font-mono text-[12.5px] leading-relaxed">
        <code className="!bg-transparent !p-0">{children}</code>
      </pre>
    </figure>
  );
}
