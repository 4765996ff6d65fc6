"use client";

import { useState } from "react";
import { buttonClass } from "../../_components/ui";

/** The one time a key's secret is shown, with a copy button. */
export function SecretOnce({ title, secret, note, onDone }: { title: string; secret: string; note?: string; onDone: () => void }) {
  const [copied, setCopied] = useState<"yes" | "no" | null>(null);
  async function copy() {
    try {
      await navigator.clipboard.writeText(secret);
      setCopied("yes");
    } catch {
      setCopied("no");
    }
  }
  return (
    <section aria-labelledby="secret-title" className="rounded-xl border-2 border-fold-500 bg-fold-50 p-5">
      <h2 id="secret-title" className="font-display text-lg font-semibold text-fold-900">
        {title}
      </h2>
      <p className="mt-1 text-sm text-fold-900">
        Copy the secret now and keep it in your secret store. <strong>It is shown this once</strong>: Sumfold keeps only a fingerprint of it.
      </p>
      {note ? <p className="mt-1 text-sm text-fold-900">{note}</p> : null}
      <div className="mt-3 flex flex-wrap items-center gap-2">
        <code data-testid="new-secret" className="block max-w-full select-all overflow-x-auto rounded-md border border-fold-500/40 bg-white px-3 py-2 font-mono text-sm">
          {secret}
        </code>
        <button type="button" className={buttonClass} onClick={copy}>
          Copy
        </button>
        <span role="status" aria-live="polite" className="text-sm text-fold-900">
          {copied === "yes" ? "Copied to the clipboard." : copied === "no" ? "Copying is blocked here: select the text and copy it." : ""}
        </span>
      </div>
      <button type="button" className="mt-4 text-sm font-semibold text-fold-700 underline" onClick={onDone}>
        I have stored it — hide the secret
      </button>
    </section>
  );
}
