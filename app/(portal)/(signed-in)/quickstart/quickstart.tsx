"use client";

import { useState } from "react";
import { Caution } from "@/app/_components/caution";
import { ALL_SCOPES } from "@/lib/api/scopes";
import { aggregateClaimsModel } from "@/lib/demo/scenario";
import { portalFetch, PortalFetchError } from "../../_components/fetch";
import { has, useMe } from "../../_components/me";
import { OrgLink } from "../../_components/org-link";
import { buttonClass, FormError, PageHeader, quietButtonClass } from "../../_components/ui";
import { CodeSnippets } from "../explorer/code-snippets";

const CALL = { path: "/api/v1/moments", body: { model: aggregateClaimsModel, order: 2 } };

function Step({ n, title, done, children }: { n: number; title: string; done: boolean; children: React.ReactNode }) {
  return (
    <li className="rounded-xl border border-paper-line bg-white p-5">
      <h2 className="flex items-center gap-3 font-display text-lg font-semibold">
        <span aria-hidden="true" className={`inline-flex h-7 w-7 shrink-0 items-center justify-center rounded-full text-sm ${done ? "bg-fold-600 text-white" : "bg-paper-warm text-ink"}`}>
          {done ? "✓" : n}
        </span>
        {title}
        {done ? <span className="sr-only">(done)</span> : null}
      </h2>
      <div className="mt-3 space-y-3 text-sm text-ink-soft">{children}</div>
    </li>
  );
}

/** Five minutes from a new account to a first answer: a key, the call in your language, and its output. */
export function Quickstart() {
  const { me } = useMe();
  const [secret, setSecret] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [output, setOutput] = useState<{ status: number; body: unknown } | null>(null);
  if (!me) return null;
  const canKey = has(me, "keys.own");

  async function createKey() {
    setBusy(true);
    setError(null);
    try {
      const r = await portalFetch<{ secret: string }>("/api/portal/keys", { body: { label: "quickstart", scopes: ALL_SCOPES } });
      setSecret(r.secret);
    } catch (e) {
      setError((e as PortalFetchError).problem?.error ?? "The key could not be created.");
    } finally {
      setBusy(false);
    }
  }

  async function runHere() {
    if (!secret) return;
    setBusy(true);
    try {
      const res = await fetch(CALL.path, { method: "POST", headers: { authorization: `Bearer ${secret}`, "content-type": "application/json" }, body: JSON.stringify(CALL.body) });
      setOutput({ status: res.status, body: await res.json().catch(() => null) });
    } catch {
      setError("The call did not reach the server. Check your connection and try again.");
    } finally {
      setBusy(false);
    }
  }

  const mean = (output?.body as { mean?: number } | null)?.mean;
  return (
    <div className="space-y-6">
      <PageHeader title="Quickstart" lead="From a new account to a first answer in about five minutes: make a key, copy the call, see what comes back." />
      <ol className="space-y-4">
        <Step n={1} title="Your account" done>
          <p>
            You are signed in as <strong className="text-ink">{me.user.email}</strong> in <strong className="text-ink">{me.organization.name}</strong>. Colleagues join by invitation from the Members page.
          </p>
        </Step>
        <Step n={2} title="Make an API key" done={!!secret}>
          {!canKey ? (
            <p>Your role does not hold keys; a developer or an admin of {me.organization.name} makes them.</p>
          ) : secret ? (
            <>
              <p>Your key is below. It is shown this once: keep it in your password manager or your platform&rsquo;s secret store, never in code.</p>
              <pre className="overflow-x-auto rounded-md bg-ink p-3 font-mono text-xs text-paper" data-testid="quickstart-secret">
                export SUMFOLD_KEY={secret}
              </pre>
            </>
          ) : (
            <>
              <p>A key named “quickstart” with every read scope. You can rotate or revoke it later on the API keys page.</p>
              <button type="button" className={buttonClass} onClick={createKey} disabled={busy}>
                Make my key
              </button>
            </>
          )}
          <FormError message={error} />
        </Step>
        <Step n={3} title="Copy the call" done={!!output}>
          <p>
            The moments of Harrowgate Mutual&rsquo;s hail book (an invented insurer): 42 claims a year on average, each gamma-distributed. Set <code className="rounded bg-paper-warm px-1 font-mono">SUMFOLD_KEY</code> as above, then run one of these.
          </p>
          <CodeSnippets path={CALL.path} body={CALL.body} title="Your first call" />
          {secret ? (
            <button type="button" className={quietButtonClass} onClick={runHere} disabled={busy}>
              {busy ? "Calling…" : "Run it here with my key"}
            </button>
          ) : null}
        </Step>
        <Step n={4} title="See the answer" done={output?.status === 200}>
          {output ? (
            <>
              <p>
                HTTP {output.status}
                {typeof mean === "number" ? (
                  <>
                    {" "}
                    · the mean is <strong className="text-ink" data-testid="quickstart-mean">{Number(mean.toPrecision(10))}</strong> thousand euros: 42 claims × 1.8 / 0.12 = 630, as Wald&rsquo;s identity says.
                  </>
                ) : null}
              </p>
              <pre className="max-h-80 overflow-auto rounded-md border border-paper-line bg-paper-warm p-3 font-mono text-xs text-ink" data-testid="quickstart-output">
                {JSON.stringify(output.body, null, 2)}
              </pre>
              <Caution />
            </>
          ) : (
            <p>The response appears here: the raw and central moments, the cumulants, the mean and the variance, and what the call cost.</p>
          )}
        </Step>
      </ol>
      <p className="text-sm text-ink-soft">
        Next: build your own model in the <OrgLink href="/explorer" className="font-semibold text-fold-600 underline">explorer</OrgLink>, read the <a href="/docs/models" className="font-semibold text-fold-600 underline">model notation</a>, or follow your calls on the{" "}
        <OrgLink href="/usage" className="font-semibold text-fold-600 underline">usage</OrgLink> page.
      </p>
    </div>
  );
}
