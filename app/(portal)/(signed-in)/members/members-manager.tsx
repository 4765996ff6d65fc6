"use client";

import { useCallback, useEffect, useState, type FormEvent } from "react";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { fieldErrors, inviteSchema } from "@/lib/portal/schemas";
import { portalFetch, PortalFetchError } from "../../_components/fetch";
import { has, useMe } from "../../_components/me";
import { buttonClass, dangerButtonClass, Empty, Field, fmtDate, FormError, Loading, Notice, PageHeader, quietButtonClass, ScrollHint } from "../../_components/ui";

type Role = keyof typeof ROLE_LABELS;
const ROLE_LIST = Object.keys(ROLE_LABELS) as Role[];
const ROLE_HELP: Record<Role, string> = {
  admin: "members, every key, plan",
  developer: "own keys, docs, own usage",
  billing: "usage, quota, plan; no keys",
};

interface Data {
  members: { userId: number; name: string; email: string; role: Role; joinedAt: string; you: boolean }[];
  invitations: { id: number; email: string; role: Role; expiresAt: string; sentAt: string; invitedByName: string | null; expired: boolean }[];
}

export function MembersManager() {
  const { me, reload: reloadMe } = useMe();
  const [data, setData] = useState<Data | null>(null);
  const [loadError, setLoadError] = useState<string | null>(null);
  const [flash, setFlash] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  // A role change waits for a confirmation that says what the new role may do.
  const [pending, setPending] = useState<{ userId: number; name: string; from: Role; to: Role } | null>(null);
  const [removing, setRemoving] = useState<Data["members"][number] | null>(null);

  const load = useCallback(() => {
    portalFetch<Data>("/api/portal/members")
      .then((d) => (setData(d), setLoadError(null)))
      .catch((e: PortalFetchError) => setLoadError(e.problem?.error ?? "The members could not be loaded."));
  }, []);
  useEffect(load, [load]);

  if (me && !has(me, "members.manage")) return <FormError message="Only admins manage the members of an organisation." />;

  async function run(label: string, p: Promise<unknown>) {
    setError(null);
    setFlash(null);
    try {
      await p;
      setFlash(label);
      load();
      reloadMe();
    } catch (e) {
      setError((e as PortalFetchError).problem?.error ?? "That did not work.");
      load(); // puts the role pickers back to what the database holds
    }
  }

  return (
    <div className="space-y-8">
      <PageHeader title="Members" lead={`People of ${me?.organization.name ?? "this organisation"} and what they may do.`} />
      {flash ? <Notice tone="success">{flash}</Notice> : null}
      <FormError message={error} />
      {removing ? (
        <RemovePanel
          member={removing}
          onCancel={() => setRemoving(null)}
          onDone={(message) => {
            setRemoving(null);
            setError(null);
            setFlash(message);
            load();
            reloadMe();
          }}
        />
      ) : null}
      <InviteForm onInvited={(email) => (setFlash(`Invitation sent to ${email}.`), load())} />
      {loadError ? <FormError message={loadError} /> : !data ? <Loading label="Loading members…" /> : (
        <>
          <section aria-labelledby="members-h">
            <h2 id="members-h" className="font-display text-xl font-semibold">People</h2>
            {pending ? (
              <div role="alertdialog" aria-labelledby="role-confirm" className="mt-3 rounded-xl border border-amber-300 bg-amber-50 p-4 text-sm">
                <p id="role-confirm" className="font-semibold">
                  Change {pending.name} from {ROLE_LABELS[pending.from].toLowerCase()} to {ROLE_LABELS[pending.to].toLowerCase()}?
                </p>
                <p className="mt-1 text-ink-soft">
                  {ROLE_LABELS[pending.to]}s may: {ROLE_HELP[pending.to]}.{pending.to === "admin" ? " An admin can also remove you." : ""}
                </p>
                <div className="mt-3 flex flex-wrap gap-2">
                  <button
                    type="button"
                    className={buttonClass}
                    onClick={() => {
                      const p = pending;
                      setPending(null);
                      void run(`${p.name} is now ${ROLE_LABELS[p.to].toLowerCase()}.`, portalFetch(`/api/portal/members/${p.userId}`, { method: "PATCH", body: { role: p.to } }));
                    }}
                  >
                    Change role
                  </button>
                  <button type="button" className={quietButtonClass} onClick={() => setPending(null)}>
                    Keep {ROLE_LABELS[pending.from].toLowerCase()}
                  </button>
                </div>
              </div>
            ) : null}
            <ScrollHint />
            <div className="relative mt-3 overflow-x-auto rounded-xl border border-paper-line bg-white">
              <table className="w-full min-w-[40rem] text-left text-sm">
                <thead className="border-b border-paper-line bg-paper-warm text-xs uppercase tracking-wide text-ink-faint">
                  <tr>
                    <th scope="col" className="px-4 py-2">Name</th>
                    <th scope="col" className="px-4 py-2">E-mail</th>
                    <th scope="col" className="px-4 py-2">Role</th>
                    <th scope="col" className="px-4 py-2">Joined</th>
                    <th scope="col" className="sticky right-0 bg-paper-warm px-4 py-2"><span className="sr-only">Actions</span></th>
                  </tr>
                </thead>
                <tbody>
                  {data.members.map((m) => (
                    <tr key={m.userId} className="border-b border-paper-line last:border-0">
                      <td className="px-4 py-2 font-semibold">{m.name}{m.you ? <span className="ml-1 text-xs font-normal text-ink-faint">(you)</span> : null}</td>
                      <td className="px-4 py-2">{m.email}</td>
                      <td className="px-4 py-2">
                        <select
                          aria-label={`Role of ${m.name}`}
                          className="rounded-md border border-paper-line bg-white px-2 py-1"
                          value={pending?.userId === m.userId ? pending.to : m.role}
                          onChange={(e) => setPending(e.target.value === m.role ? null : { userId: m.userId, name: m.name, from: m.role, to: e.target.value as Role })}
                        >
                          {ROLE_LIST.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
                        </select>
                      </td>
                      <td className="px-4 py-2">{fmtDate(m.joinedAt)}</td>
                      <td className="sticky right-0 bg-white px-4 py-2 text-right">
                        <button type="button" className={dangerButtonClass} aria-label={`Remove ${m.name}`} onClick={() => (setFlash(null), setRemoving(m))}>
                          Remove
                        </button>
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </section>
          <section aria-labelledby="inv-h">
            <h2 id="inv-h" className="font-display text-xl font-semibold">Open invitations</h2>
            {data.invitations.length === 0 ? (
              <div className="mt-3"><Empty title="No open invitations">Invitations you send appear here until they are accepted.</Empty></div>
            ) : (
              <ul className="mt-3 divide-y divide-paper-line rounded-xl border border-paper-line bg-white">
                {data.invitations.map((i) => (
                  <li key={i.id} className="flex flex-wrap items-center justify-between gap-3 px-4 py-3 text-sm">
                    <span>
                      <strong>{i.email}</strong> as {ROLE_LABELS[i.role].toLowerCase()} · sent {fmtDate(i.sentAt)}{i.invitedByName ? ` by ${i.invitedByName}` : ""} ·{" "}
                      {i.expired ? <span className="font-semibold text-red-700">expired</span> : `valid until ${fmtDate(i.expiresAt)}`}
                    </span>
                    <span className="flex gap-2">
                      <button type="button" className={quietButtonClass} aria-label={`Resend the invitation to ${i.email}`} onClick={() => run(`A new link was sent to ${i.email}.`, portalFetch(`/api/portal/invitations/${i.id}/resend`, { method: "POST", body: {} }))}>
                        Resend
                      </button>
                      <button type="button" className={dangerButtonClass} aria-label={`Withdraw the invitation to ${i.email}`} onClick={() => run(`The invitation to ${i.email} is withdrawn.`, portalFetch(`/api/portal/invitations/${i.id}`, { method: "DELETE" }))}>
                        Withdraw
                      </button>
                    </span>
                  </li>
                ))}
              </ul>
            )}
          </section>
        </>
      )}
    </div>
  );
}

interface Preview {
  member: { userId: number; name: string; email: string; role: Role };
  activeKeys: { id: number; label: string; prefix: string; scopes: string[]; lastUsedAt: string | null; state: string }[];
  transferTo: { userId: number; name: string; role: Role }[];
}

/** Removal asks first: it lists the member's working keys and revokes them (default) or hands them to someone. */
function RemovePanel({ member, onCancel, onDone }: { member: Data["members"][number]; onCancel: () => void; onDone: (message: string) => void }) {
  const [preview, setPreview] = useState<Preview | null>(null);
  const [choice, setChoice] = useState<"revoke" | "transfer">("revoke");
  const [heir, setHeir] = useState<number | "">("");
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  useEffect(() => {
    portalFetch<Preview>(`/api/portal/members/${member.userId}`)
      .then(setPreview)
      .catch((e: PortalFetchError) => setError(e.problem?.error ?? "The member's keys could not be loaded."));
  }, [member.userId]);

  async function confirm(e: FormEvent) {
    e.preventDefault();
    if (choice === "transfer" && heir === "") return setError("Choose the member who takes the keys.");
    setBusy(true);
    setError(null);
    try {
      const r = await portalFetch<{ keyIds: number[] }>(`/api/portal/members/${member.userId}`, {
        method: "DELETE",
        body: choice === "transfer" ? { keys: "transfer", transferTo: heir } : { keys: "revoke" },
      });
      const n = r.keyIds.length;
      const keysNote = n === 0 ? "" : choice === "transfer" ? ` ${n} key${n === 1 ? "" : "s"} now belong${n === 1 ? "s" : ""} to ${preview?.transferTo.find((t) => t.userId === heir)?.name}.` : ` ${n} key${n === 1 ? " was" : "s were"} revoked.`;
      onDone(`${member.name} was removed.${keysNote}`);
    } catch (err) {
      setError((err as PortalFetchError).problem?.error ?? "That did not work.");
      setBusy(false);
    }
  }

  const keys = preview?.activeKeys ?? [];
  return (
    <form onSubmit={confirm} aria-label={`Remove ${member.name}`} className="space-y-4 rounded-xl border border-red-200 bg-white p-5">
      <h2 className="font-display text-lg font-semibold">Remove {member.name} from this organisation?</h2>
      <p className="text-sm text-ink-soft">
        {member.email} loses access to this organisation&apos;s pages at once. Their account and other organisations are not affected.
      </p>
      <FormError message={error} />
      {!preview ? (
        <Loading label="Looking up their keys…" />
      ) : keys.length === 0 ? (
        <p className="text-sm">They have no working API keys here.</p>
      ) : (
        <>
          <div>
            <p className="text-sm font-semibold">Their working API keys ({keys.length})</p>
            <ul className="mt-2 divide-y divide-paper-line rounded-md border border-paper-line text-sm" aria-label="Their working API keys">
              {keys.map((k) => (
                <li key={k.id} className="flex flex-wrap justify-between gap-2 px-3 py-2">
                  <span>
                    <strong>{k.label}</strong> <span className="font-mono text-xs text-ink-faint">{k.prefix}</span>
                  </span>
                  <span className="text-xs text-ink-faint">{k.lastUsedAt ? `last used ${fmtDate(k.lastUsedAt)}` : "never used"}{k.state === "retiring" ? " · retiring" : ""}</span>
                </li>
              ))}
            </ul>
          </div>
          <fieldset className="space-y-2">
            <legend className="text-sm font-semibold">What happens to these keys</legend>
            <label className="flex items-start gap-2 text-sm">
              <input type="radio" name="keys" value="revoke" checked={choice === "revoke"} onChange={() => setChoice("revoke")} className="mt-1" />
              <span>
                <strong>Revoke them now</strong> (recommended): calls with them are refused from now on.
              </span>
            </label>
            <label className="flex items-start gap-2 text-sm">
              <input type="radio" name="keys" value="transfer" checked={choice === "transfer"} onChange={() => setChoice("transfer")} className="mt-1" disabled={preview.transferTo.length === 0} />
              <span>
                <strong>Hand them to another member</strong>, who then sees and manages them; they keep working.
                {preview.transferTo.length === 0 ? <span className="block text-ink-faint">No other admin or developer can hold keys.</span> : null}
              </span>
            </label>
            {choice === "transfer" ? (
              <label className="ml-6 block text-sm font-semibold">
                New owner
                <select className="mt-1 block rounded-md border border-paper-line bg-white px-3 py-2" value={heir} onChange={(e) => setHeir(e.target.value ? Number(e.target.value) : "")}>
                  <option value="">Choose a member…</option>
                  {preview.transferTo.map((t) => (
                    <option key={t.userId} value={t.userId}>
                      {t.name} ({ROLE_LABELS[t.role].toLowerCase()})
                    </option>
                  ))}
                </select>
              </label>
            ) : null}
          </fieldset>
        </>
      )}
      <div className="flex flex-wrap gap-3">
        <button type="submit" className={`${dangerButtonClass} !bg-red-700 !text-white`} disabled={busy || !preview}>
          {busy ? "Removing…" : `Remove ${member.name}`}
        </button>
        <button type="button" className={quietButtonClass} onClick={onCancel}>
          Cancel
        </button>
      </div>
      <p className="text-xs text-ink-faint">The audit log records the removal and what happened to each key.</p>
    </form>
  );
}

function InviteForm({ onInvited }: { onInvited: (email: string) => void }) {
  const [email, setEmail] = useState("");
  const [role, setRole] = useState<Role>("developer");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  // A role change waits for a confirmation that says what the new role may do.
  const [pending, setPending] = useState<{ userId: number; name: string; from: Role; to: Role } | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(e: FormEvent) {
    e.preventDefault();
    setError(null);
    const parsed = inviteSchema.safeParse({ email, role });
    if (!parsed.success) return setErrors(fieldErrors(parsed.error));
    setErrors({});
    setBusy(true);
    try {
      await portalFetch("/api/portal/invitations", { body: parsed.data });
      setEmail("");
      onInvited(parsed.data.email);
    } catch (err) {
      const p = (err as PortalFetchError).problem;
      setError(p?.error ?? "The invitation could not be sent.");
      if (p?.fields) setErrors(p.fields);
    } finally {
      setBusy(false);
    }
  }

  return (
    <form onSubmit={submit} noValidate aria-label="Invite someone" className="space-y-3 rounded-xl border border-paper-line bg-white p-5">
      <h2 className="font-display text-lg font-semibold">Invite someone</h2>
      <FormError message={error} />
      <div className="grid gap-4 sm:grid-cols-[1fr_16rem_auto] sm:items-start">
        <Field label="E-mail" name="email" type="email" value={email} onChange={setEmail} error={errors.email} required />
        <label className="block text-sm font-semibold">
          Role
          <select name="role" className="mt-1 block w-full rounded-md border border-paper-line bg-white px-3 py-2" value={role} onChange={(e) => setRole(e.target.value as Role)}>
            {ROLE_LIST.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
          </select>
        </label>
        <button type="submit" className={`${buttonClass} sm:mt-6`} disabled={busy}>
          {busy ? "Sending…" : "Send invitation"}
        </button>
      </div>
      <p className="text-xs text-ink-faint">
        {ROLE_LIST.map((r) => `${ROLE_LABELS[r]}: ${ROLE_HELP[r]}`).join(" · ")}. The link works once, for 7 days.
      </p>
    </form>
  );
}
