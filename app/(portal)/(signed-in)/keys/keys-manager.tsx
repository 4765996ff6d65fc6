"use client";

import { useCallback, useEffect, useId, useState, type FormEvent } from "react";
import { ALL_SCOPES, SCOPES, type Scope } from "@/lib/api/scopes";
import { fieldErrors, GRACE_CHOICES, GRACE_LABELS, keyCreateSchema, keyUpdateSchema, splitCidrs } from "@/lib/portal/schemas";
import type { KeyView } from "@/lib/portal/keys";
import { portalFetch, PortalFetchError } from "../../_components/fetch";
import { has, useMe } from "../../_components/me";
import { buttonClass, dangerButtonClass, Empty, Field, fmtDate, FormError, Loading, Notice, PageHeader, quietButtonClass, ScrollHint } from "../../_components/ui";
import { SecretOnce } from "./secret-once";

const STATE_STYLE: Record<KeyView["state"], string> = {
  active: "bg-fold-100 text-fold-900",
  retiring: "bg-caution-50 text-caution-700 border border-caution-500/40",
  revoked: "bg-red-50 text-red-800",
  expired: "bg-paper-warm text-ink-faint",
};

function StateBadge({ k }: { k: KeyView }) {
  const text = k.state === "retiring" ? `Retiring until ${fmtDate(k.retiringUntil)}` : k.state[0].toUpperCase() + k.state.slice(1);
  return <span className={`inline-block rounded-full px-2 py-0.5 text-xs font-semibold ${STATE_STYLE[k.state]}`}>{text}</span>;
}

type Action = { kind: "rotate" | "revoke" | "edit"; key: KeyView } | null;

function ExpiryReminder({ k }: { k: KeyView }) {
  if (k.expiresInDays === null) return null;
  const when = k.expiresInDays === 0 ? "today" : k.expiresInDays === 1 ? "tomorrow" : `in ${k.expiresInDays} days`;
  return (
    <span className="mt-1 block text-xs font-semibold text-caution-700" role="status">
      Expires {when}: rotate it before then
    </span>
  );
}

export function KeysManager() {
  const { me } = useMe();
  const [keys, setKeys] = useState<KeyView[] | null>(null);
  const [loadError, setLoadError] = useState<string | null>(null);
  const [creating, setCreating] = useState(false);
  const [revealed, setRevealed] = useState<{ title: string; secret: string; note?: string } | null>(null);
  const [action, setAction] = useState<Action>(null);
  const [flash, setFlash] = useState<string | null>(null);

  const load = useCallback(() => {
    portalFetch<{ keys: KeyView[] }>("/api/portal/keys")
      .then((r) => {
        setKeys(r.keys);
        setLoadError(null);
      })
      .catch((e: PortalFetchError) => setLoadError(e.problem?.error ?? "The keys could not be loaded."));
  }, []);
  // a role without keys is told so below; asking the server anyway would only log a refused request in the console
  const allowed = me ? has(me, "keys.own") : null;
  useEffect(() => {
    if (allowed) load();
  }, [load, allowed]);

  if (me && !has(me, "keys.own")) {
    return <FormError message="Your role in this organisation does not include API keys. Usage and the monthly quota are on the Usage page." />;
  }

  return (
    <div className="space-y-6">
      <PageHeader
        title="API keys"
        lead={has(me, "keys.all") ? "Every key of the organisation. Keys authenticate calls to the Sumfold API." : "The keys you created. Keys authenticate calls to the Sumfold API."}
        actions={
          creating ? null : (
            <button type="button" className={buttonClass} onClick={() => (setCreating(true), setRevealed(null), setFlash(null))}>
              New key
            </button>
          )
        }
      />
      {revealed ? <SecretOnce {...revealed} onDone={() => setRevealed(null)} /> : null}
      {flash ? <Notice tone="success">{flash}</Notice> : null}
      {creating ? (
        <CreateKeyForm
          onCancel={() => setCreating(false)}
          onCreated={(label, secret) => {
            setCreating(false);
            setRevealed({ title: `Key “${label}” created`, secret });
            load();
          }}
        />
      ) : null}
      {action?.kind === "edit" ? (
        <EditKeyForm
          k={action.key}
          onCancel={() => setAction(null)}
          onSaved={(label) => {
            setAction(null);
            setFlash(`Key “${label}” saved. Its secret did not change.`);
            load();
          }}
        />
      ) : action ? (
        <ActionPanel
          action={{ kind: action.kind, key: action.key }}
          onCancel={() => setAction(null)}
          onDone={(message, secret, note) => {
            setAction(null);
            if (secret) setRevealed({ title: message, secret, note });
            else setFlash(message);
            load();
          }}
        />
      ) : null}
      {loadError ? <FormError message={loadError} /> : keys === null ? <Loading label="Loading keys…" /> : keys.length === 0 ? (
        <Empty title="No keys yet">Create a key to call the API from your code. You choose which endpoint groups it may use.</Empty>
      ) : (
        <div>
        <ScrollHint />
        <div className="relative mt-1 overflow-x-auto rounded-xl border border-paper-line bg-white">
          <table className="w-full min-w-[56rem] text-left text-sm">
            <caption className="sr-only">API keys</caption>
            <thead className="border-b border-paper-line bg-paper-warm text-xs uppercase tracking-wide text-ink-faint">
              <tr>
                <th scope="col" className="px-4 py-2">Label</th>
                <th scope="col" className="px-4 py-2">Prefix</th>
                <th scope="col" className="px-4 py-2">Created by</th>
                <th scope="col" className="px-4 py-2">Created</th>
                <th scope="col" className="px-4 py-2">Last used</th>
                <th scope="col" className="px-4 py-2">Expires</th>
                <th scope="col" className="px-4 py-2">State</th>
                <th scope="col" className="sticky right-0 bg-paper-warm px-4 py-2"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody>
              {keys.map((k) => (
                <tr key={k.id} data-key-prefix={k.prefix} className="border-b border-paper-line last:border-0">
                  <td className="px-4 py-2 font-semibold">
                    {k.label}
                    <div className="text-xs font-normal text-ink-faint">{k.scopes.join(", ")}</div>
                    {k.allowedCidrs.length ? <div className="text-xs font-normal text-ink-faint">Only from {k.allowedCidrs.join(", ")}</div> : null}
                  </td>
                  <td className="px-4 py-2 font-mono text-xs">{k.prefix}</td>
                  <td className="px-4 py-2">{k.createdBy ?? "—"}</td>
                  <td className="px-4 py-2">{fmtDate(k.createdAt)}</td>
                  <td className="px-4 py-2">{k.lastUsedAt ? fmtDate(k.lastUsedAt) : "Never"}</td>
                  <td className="px-4 py-2">
                    {k.expiresAt ? fmtDate(k.expiresAt) : "No expiry"}
                    <ExpiryReminder k={k} />
                  </td>
                  <td className="px-4 py-2"><StateBadge k={k} /></td>
                  <td className="sticky right-0 bg-white px-4 py-2 text-right whitespace-nowrap shadow-[-8px_0_8px_-8px_rgba(0,0,0,0.15)]">
                    {k.state === "active" ? (
                      <span className="inline-flex gap-2">
                        <button type="button" className={quietButtonClass} aria-label={`Edit ${k.label} (${k.prefix})`} onClick={() => setAction({ kind: "edit", key: k })}>
                          Edit
                        </button>
                        <button type="button" className={quietButtonClass} aria-label={`Rotate ${k.label} (${k.prefix})`} onClick={() => setAction({ kind: "rotate", key: k })}>
                          Rotate
                        </button>
                        <button type="button" className={dangerButtonClass} aria-label={`Revoke ${k.label} (${k.prefix})`} onClick={() => setAction({ kind: "revoke", key: k })}>
                          Revoke
                        </button>
                      </span>
                    ) : k.state === "retiring" ? (
                      <button type="button" className={dangerButtonClass} aria-label={`Revoke ${k.label} (${k.prefix}) now`} onClick={() => setAction({ kind: "revoke", key: k })}>
                        Revoke now
                      </button>
                    ) : null}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        </div>
      )}
    </div>
  );
}

function CreateKeyForm({ onCancel, onCreated }: { onCancel: () => void; onCreated: (label: string, secret: string) => void }) {
  const [label, setLabel] = useState("");
  // Every scope is read-only computation: a new key may call every endpoint unless narrowed here.
  const [scopes, setScopes] = useState<Scope[]>([...ALL_SCOPES]);
  const [expiresOn, setExpiresOn] = useState("");
  const [cidrs, setCidrs] = useState("");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(e: FormEvent) {
    e.preventDefault();
    setError(null);
    const parsed = keyCreateSchema.safeParse({ label, scopes, expiresOn: expiresOn || undefined, allowedCidrs: splitCidrs(cidrs) });
    if (!parsed.success) return setErrors(fieldErrors(parsed.error));
    setErrors({});
    setBusy(true);
    try {
      const r = await portalFetch<{ key: KeyView; secret: string }>("/api/portal/keys", { body: parsed.data });
      onCreated(r.key.label, r.secret);
    } catch (err) {
      const p = (err as PortalFetchError).problem;
      setError(p?.error ?? "The key could not be created.");
      if (p?.fields) setErrors(p.fields);
      setBusy(false);
    }
  }

  const tomorrow = new Date(Date.now() + 86_400_000).toISOString().slice(0, 10);

  return (
    <form onSubmit={submit} noValidate aria-label="New API key" className="space-y-4 rounded-xl border border-paper-line bg-white p-5">
      <h2 className="font-display text-lg font-semibold">New key</h2>
      <FormError message={error} />
      <Field label="Label" name="label" value={label} onChange={setLabel} error={errors.label} hint="What the key is for, e.g. “pricing batch job”." required />
      <ScopePicker scopes={scopes} onChange={setScopes} error={errors.scopes} />
      <Field label="Expires on (optional)" name="expiresOn" type="date" min={tomorrow} value={expiresOn} onChange={setExpiresOn} error={errors.expiresOn} hint="Leave empty for a key without expiry. It stops at the end of that day (UTC)." />
      <Field label="Allowed client addresses (optional)" name="allowedCidrs" value={cidrs} onChange={setCidrs} error={errors.allowedCidrs} hint={CIDR_HINT} />
      <SubmitOrCancel busy={busy} label="Create key" busyLabel="Creating…" onCancel={onCancel} />
    </form>
  );
}

function SubmitOrCancel({ busy, label, busyLabel, onCancel }: { busy: boolean; label: string; busyLabel: string; onCancel: () => void }) {
  return (
    <div className="flex gap-3">
      <button type="submit" className={buttonClass} disabled={busy}>
        {busy ? busyLabel : label}
      </button>
      <button type="button" className={quietButtonClass} onClick={onCancel}>
        Cancel
      </button>
    </div>
  );
}

const CIDR_HINT = "Ranges like 203.0.113.0/24 or 2001:db8::/48, separated by commas. Calls from elsewhere are refused (403). Leave empty to accept any address.";

function ScopePicker({ scopes, onChange, error }: { scopes: Scope[]; onChange: (scopes: Scope[]) => void; error?: string }) {
  const id = useId();
  const onToggle = (s: Scope) => onChange(scopes.includes(s) ? scopes.filter((x) => x !== s) : [...scopes, s]);
  return (
    <fieldset aria-describedby={error ? `${id}-err` : undefined}>
      <legend className="text-sm font-semibold">Endpoint groups this key may call</legend>
      <div className="mt-2 grid gap-2 sm:grid-cols-2">
        {(Object.entries(SCOPES) as [Scope, string][]).map(([s, text]) => (
          <label key={s} className="flex items-start gap-2 rounded-md border border-paper-line p-2 text-sm">
            <input type="checkbox" name="scopes" value={s} checked={scopes.includes(s)} onChange={() => onToggle(s)} className="mt-1" />
            <span>
              <span className="font-mono font-semibold">{s}</span>
              <span className="block text-ink-faint">{text}</span>
            </span>
          </label>
        ))}
      </div>
      {error ? <p id={`${id}-err`} className="mt-1 text-sm text-red-700">{error}</p> : null}
    </fieldset>
  );
}

/** Label, scopes and address ranges change in place; the secret stays, so nothing needs redeploying. */
function EditKeyForm({ k, onCancel, onSaved }: { k: KeyView; onCancel: () => void; onSaved: (label: string) => void }) {
  const [label, setLabel] = useState(k.label);
  const [scopes, setScopes] = useState<Scope[]>(k.scopes as Scope[]);
  const [cidrs, setCidrs] = useState(k.allowedCidrs.join(", "));
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(e: FormEvent) {
    e.preventDefault();
    setError(null);
    const parsed = keyUpdateSchema.safeParse({ label, scopes, allowedCidrs: splitCidrs(cidrs) });
    if (!parsed.success) return setErrors(fieldErrors(parsed.error));
    setErrors({});
    setBusy(true);
    try {
      const r = await portalFetch<{ key: KeyView }>(`/api/portal/keys/${k.id}`, { method: "PATCH", body: parsed.data });
      onSaved(r.key.label);
    } catch (err) {
      const p = (err as PortalFetchError).problem;
      setError(p?.error ?? "The key could not be saved.");
      if (p?.fields) setErrors(p.fields);
      setBusy(false);
    }
  }

  return (
    <form onSubmit={submit} noValidate aria-label="Edit key" className="space-y-4 rounded-xl border border-paper-line bg-white p-5">
      <h2 className="font-display text-lg font-semibold">
        Edit “{k.label}” <span className="font-mono text-sm font-normal text-ink-faint">{k.prefix}</span>
      </h2>
      <p className="text-sm text-ink-soft">The secret does not change. Changes reach every server within a second.</p>
      <FormError message={error} />
      <Field label="Label" name="label" value={label} onChange={setLabel} error={errors.label} required />
      <ScopePicker scopes={scopes} onChange={setScopes} error={errors.scopes} />
      <Field label="Allowed client addresses" name="allowedCidrs" value={cidrs} onChange={setCidrs} error={errors.allowedCidrs} hint={CIDR_HINT} />
      <SubmitOrCancel busy={busy} label="Save changes" busyLabel="Saving…" onCancel={onCancel} />
    </form>
  );
}

function ActionPanel({ action, onCancel, onDone }: { action: { kind: "rotate" | "revoke"; key: KeyView }; onCancel: () => void; onDone: (message: string, secret?: string, note?: string) => void }) {
  const [grace, setGrace] = useState<(typeof GRACE_CHOICES)[number]>("24h");
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const k = action.key;

  async function go(e: FormEvent) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    try {
      if (action.kind === "rotate") {
        const r = await portalFetch<{ secret: string; graceEndsAt: string }>(`/api/portal/keys/${k.id}/rotate`, { body: { grace } });
        onDone(
          `Key “${k.label}” rotated`,
          r.secret,
          grace === "immediately" ? "The previous secret stopped working." : `The previous secret keeps working until ${fmtDate(r.graceEndsAt)}.`,
        );
      } else {
        await portalFetch(`/api/portal/keys/${k.id}/revoke`, { method: "POST", body: {} });
        onDone(`Key “${k.label}” (${k.prefix}) is revoked. Requests with it are refused.`);
      }
    } catch (err) {
      setError((err as PortalFetchError).problem?.error ?? "That did not work.");
      setBusy(false);
    }
  }

  return (
    <form onSubmit={go} aria-label={action.kind === "rotate" ? "Rotate key" : "Revoke key"} className="space-y-3 rounded-xl border border-paper-line bg-white p-5">
      <h2 className="font-display text-lg font-semibold">
        {action.kind === "rotate" ? "Rotate" : "Revoke"} “{k.label}” <span className="font-mono text-sm font-normal text-ink-faint">{k.prefix}</span>
      </h2>
      <FormError message={error} />
      {action.kind === "rotate" ? (
        <>
          <p className="text-sm text-ink-soft">A new secret is issued with the same label, scopes and expiry. Choose when the current secret stops working, so you can deploy the new one first.</p>
          <label className="block text-sm font-semibold">
            The current secret stops working
            <select className="mt-1 block rounded-md border border-paper-line bg-white px-3 py-2" value={grace} onChange={(e) => setGrace(e.target.value as typeof grace)}>
              {GRACE_CHOICES.map((g) => (
                <option key={g} value={g}>
                  {GRACE_LABELS[g]}
                </option>
              ))}
            </select>
          </label>
        </>
      ) : (
        <p className="text-sm text-ink-soft">Requests with this key are refused from now on. This cannot be undone.</p>
      )}
      <div className="flex gap-3">
        <button type="submit" className={action.kind === "rotate" ? buttonClass : `${dangerButtonClass} !bg-red-700 !text-white`} disabled={busy}>
          {busy ? "Working…" : action.kind === "rotate" ? "Rotate key" : "Revoke key now"}
        </button>
        <button type="button" className={quietButtonClass} onClick={onCancel}>
          Cancel
        </button>
      </div>
    </form>
  );
}
