import type { Metadata } from "next";
import Link from "next/link";
import { curlSnippet, endpointExamples, fetchSnippet, pythonSnippet } from "@/lib/api/examples";
import { Code, Prose } from "../_components/prose";

export const metadata: Metadata = { title: "Code snippets" };
// The snippets name the address this server is reached at, read at request time.
export const dynamic = "force-dynamic";

export default function SnippetsGuide() {
  const base = process.env.SUMFOLD_BASE_URL ?? "http://127.0.0.1:3000";
  return (
    <Prose>
      <h1>Code snippets</h1>
      <p>
        Each endpoint called from the shell, from TypeScript and from Python, with a request from our demo scenario. Set{" "}
        <code>SUMFOLD_KEY</code> to a key from the portal first.
      </p>
      {endpointExamples.map((e) => (
        <section key={e.id} className="space-y-3" id={e.id}>
          <h2>
            <code>
              {e.method} {e.path}
            </code>
          </h2>
          <p>
            {e.title}.
            {e.body && "model" in e.body ? (
              <>
                {" "}
                <Link className="font-semibold text-fold-600 underline" href={`/explorer?example=${e.id}`}>
                  Open in the explorer
                </Link>
              </>
            ) : null}
          </p>
          <Code label="curl">{curlSnippet(e, base)}</Code>
          <Code label="TypeScript (fetch)">{fetchSnippet(e, base)}</Code>
          <Code label="Python (requests)">{pythonSnippet(e, base)}</Code>
        </section>
      ))}
    </Prose>
  );
}
