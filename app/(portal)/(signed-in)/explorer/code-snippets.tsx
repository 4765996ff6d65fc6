"use client";

import { useId, useState } from "react";
import { curlSnippet, fetchSnippet, pythonSnippet, type SnippetCall } from "@/lib/api/examples";

const LANGS = [
  { id: "curl", label: "curl" },
  { id: "python", label: "Python (requests)" },
  { id: "typescript", label: "TypeScript (fetch)" },
] as const;
type Lang = (typeof LANGS)[number]["id"];

const SNIPPETS: Record<Lang, (c: SnippetCall, base: string) => string> = { curl: curlSnippet, python: pythonSnippet, typescript: fetchSnippet };

/** The same API call in curl, Python (requests) and TypeScript (fetch), as the docs show them; the key comes from SUMFOLD_KEY. */
export function CodeSnippets({ path, body, title }: { path: string; body: unknown; title: string }) {
  const id = useId();
  const [lang, setLang] = useState<Lang>("curl");
  const [copied, setCopied] = useState(false);
  const origin = typeof window === "undefined" ? "" : window.location.origin;
  const code = SNIPPETS[lang]({ method: "POST", path, body }, origin);
  return (
    <section aria-labelledby={`${id}-h`} className="min-w-0 rounded-xl border border-paper-line bg-ink p-4 text-paper">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id={`${id}-h`} className="text-sm font-semibold">
          {title}
        </h2>
        <div className="flex flex-wrap gap-1" role="tablist" aria-label="Language">
          {LANGS.map((l) => (
            <button
              key={l.id}
              type="button"
              role="tab"
              aria-selected={lang === l.id}
              className={`rounded px-2 py-1 text-xs font-semibold ${lang === l.id ? "bg-paper text-ink" : "text-paper/80 hover:text-paper"}`}
              onClick={() => {
                setLang(l.id);
                setCopied(false);
              }}
            >
              {l.label}
            </button>
          ))}
          <button
            type="button"
            className="ml-1 rounded border border-paper/40 px-2 py-1 text-xs font-semibold"
            onClick={() => navigator.clipboard.writeText(code).then(() => setCopied(true), () => setCopied(false))}
          >
            {copied ? "Copied" : "Copy"}
          </button>
        </div>
      </div>
      <pre className="mt-2 max-h-80 overflow-auto whitespace-pre font-mono text-xs" data-testid="snippet" data-lang={lang}>
        {code}
      </pre>
    </section>
  );
}
