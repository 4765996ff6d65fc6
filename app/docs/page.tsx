import type { Metadata } from "next";
import Link from "next/link";
import { Caution } from "@/app/_components/caution";
import { Reference } from "./_components/reference";

export const metadata: Metadata = { title: "API reference" };

export default function DocsPage() {
  return (
    <div className="space-y-6">
      <header className="max-w-3xl space-y-3">
        <h1 className="font-display text-3xl font-semibold">API reference</h1>
        <p className="text-ink-soft">
          Every endpoint takes and returns JSON under <code className="font-mono">/api/v1</code>. Press <strong>Authorize</strong>,
          paste an API key from the portal, open an operation and choose <strong>Try it out</strong> to call this server. New here?
          Start with <Link className="text-fold-600 underline" href="/docs/authentication">authentication</Link> and the{" "}
          <Link className="text-fold-600 underline" href="/docs/models">model notation</Link>.
        </p>
        <Caution />
      </header>
      <Reference />
    </div>
  );
}
