"use client";

import { signOut } from "next-auth/react";
import { useCallback, useEffect, useState, type FormEvent } from "react";
import { portalFetch, PortalFetchError } from "../../_components/fetch";
import { buttonClass, dangerButtonClass, Field, fmtDate, FormError, Loading, Notice, PageHeader, quietButtonClass } from "../../_components/ui";

interface SessionRow {
  id: string;
  client: string;
  ip: string;
  method: string;
  createdAt: string;
  lastSeenAt: string;
  current: boolean;
}

const METHOD_TEXT: Record<string, string> = {
  password: "password",
  "password+totp": "password and authenticator code",
  "password+recovery": "password and a recovery code",
  "email-link": "the e-mail confirmation link",
};

const problem = (e: unknown, fallback: string) => (e as PortalFetchError).problem?.error ?? fallback;

export function AccountSecurity() {
  return (
    <div className="space-y-8">
      <PageHeader title="Sign-in and security" lead="Where you are signed in, and how you sign in. These settings are yours, in every organisation you belong to." />
      <Sessions />
      <TwoFactor />
    </div>
  );
}

function Sessions() {
  const [rows, setRows] = useState<SessionRow[] | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [flash, setFlash] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const load = useCallback(() => {
    portalFetch<{ sessions: SessionRow[] }>("/api/portal/account/sessions")
      .then((r) => (setRows(r.sessions), setError(null)))
      .catch((e) => setError(problem(e, "Your sessions could not be loaded.")));
  }, []);
  useEffect(load, [load]);

  async function act(path: string, message: string) {
    setBusy(true);
    setFlash(null);
    try {
      await portalFetch(path, { method: "DELETE" });
      setFlash(message);
      load();
    } catch (e) {
      setError(problem(e, "That did not work."));
    } finally {
      setBusy(false);
    }
  }

  async function everywhere() {
    setBusy(true);
    try {
      await portalFetch("/api/portal/account/sessions?all=1", { method: "DELETE" });
    } finally {
      // This session has ended too: clear the cookie and go to the sign-in page.
      await signOut({ callbackUrl: "/sign-in" });
    }
  }

  const others = rows?.filter((r) => !r.current).length ?? 0;
  return (
    <section aria-labelledby="sessions-h" className="space-y-3">
      <h2 id="sessions-h" className="font-display text-xl font-semibold">Where you are signed in</h2>
      <p className="text-sm text-ink-soft">Each sign-in is a session. End any you do not recognise; changing your password through a reset link ends them all.</p>
      {flash ? <Notice tone="success">{flash}</Notice> : null}
      <FormError message={error} />
      {!rows ? (
        <Loading label="Loading your sessions…" />
      ) : (
        <ul className="divide-y divide-paper-line rounded-xl border border-paper-line bg-white" aria-label="Sessions">
          {rows.map((r) => (
            <li key={r.id} className="flex flex-wrap items-center justify-between gap-3 px-4 py-3 text-sm" data-session={r.id}>
              <div className="min-w-0">
                <p className="font-semibold">
                  {r.client}
                  {r.current ? <span className="ml-2 inline-block whitespace-nowrap rounded-full bg-fold-100 px-2 py-0.5 text-xs font-semibold text-fold-900">This browser</span> : null}
                </p>
                <p className="text-ink-faint">
                  From {r.ip} · signed in {fmtDate(r.createdAt)} with {METHOD_TEXT[r.method] ?? r.method} · last active {fmtDate(r.lastSeenAt)}
                </p>
              </div>
              {r.current ? null : (
                <button type="button" className={quietButtonClass} disabled={busy} aria-label={`Sign out ${r.client} (${r.ip})`} onClick={() => act(`/api/portal/account/sessions/${r.id}`, `${r.client} is signed out.`)}>
                  Sign out
                </button>
              )}
            </li>
          ))}
        </ul>
      )}
      <div className="flex flex-wrap gap-3">
        <button type="button" className={buttonClass} disabled={busy || others === 0} onClick={() => act("/api/portal/account/sessions", `Signed out of ${others} other session${others === 1 ? "" : "s"}.`)}>
          Sign out all other sessions
        </button>
        <button type="button" className={dangerButtonClass} disabled={busy} onClick={everywhere}>
          Sign out everywhere
        </button>
      </div>
    </section>
  );
}

interface Status {
  enabled: boolean;
  enabledAt: string | null;
  recoveryCodesLeft: number;
}

function TwoFactor() {
  const [status, setStatus] = useState<Status | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [step, setStep] = useState<"idle" | "password" | "scan" | "codes" | "disable">("idle");
  const [password, setPassword] = useState("");
  const [code, setCode] = useState("");
  const [fields, setFields] = useState<Record<string, string>>({});
  const [enrol, setEnrol] = useState<{ secret: string; uri: string; qrSvg: string } | null>(null);
  const [codes, setCodes] = useState<string[] | null>(null);
  const [busy, setBusy] = useState(false);

  const load = useCallback(() => {
    portalFetch<Status>("/api/portal/account/two-factor")
      .then(setStatus)
      .catch((e) => setError(problem(e, "Two-step sign-in could not be loaded.")));
  }, []);
  useEffect(load, [load]);

  async function run(fn: () => Promise<void>) {
    setBusy(true);
    setError(null);
    setFields({});
    try {
      await fn();
    } catch (e) {
      const p = (e as PortalFetchError).problem;
      setError(p?.error ?? "That did not work.");
      if (p?.fields) setFields(p.fields);
    } finally {
      setBusy(false);
    }
  }

  const start = (e: FormEvent) => {
    e.preventDefault();
    void run(async () => {
      setEnrol(await portalFetch<{ secret: string; uri: string; qrSvg: string }>("/api/portal/account/two-factor", { body: { password } }));
      setPassword("");
      setStep("scan");
    });
  };
  const confirm = (e: FormEvent) => {
    e.preventDefault();
    void run(async () => {
      const r = await portalFetch<{ recoveryCodes: string[] }>("/api/portal/account/two-factor/confirm", { body: { code: code.trim() } });
      setCodes(r.recoveryCodes);
      setEnrol(null);
      setCode("");
      setStep("codes");
      load();
    });
  };
  const disable = (e: FormEvent) => {
    e.preventDefault();
    void run(async () => {
      await portalFetch("/api/portal/account/two-factor", { method: "DELETE", body: { password } });
      setPassword("");
      setStep("idle");
      load();
    });
  };

  return (
    <section aria-labelledby="tfa-h" className="space-y-3">
      <h2 id="tfa-h" className="font-display text-xl font-semibold">Two-step sign-in</h2>
      <p className="text-sm text-ink-soft">
        After your password, Sumfold asks for a 6-digit code from an authenticator app on your phone. Recommended for admins: an admin&apos;s
        account can issue keys and manage members.
      </p>
      <FormError message={error} />
      {!status ? (
        <Loading label="Loading…" />
      ) : step === "codes" && codes ? (
        <div className="space-y-3 rounded-xl border border-fold-500 bg-white p-5" aria-label="Recovery codes">
          <Notice tone="success">Two-step sign-in is on.</Notice>
          <p className="text-sm">
            Keep these recovery codes somewhere safe (a password manager). Each works once, in place of a code, if you lose your phone.{" "}
            <strong>They are shown only now.</strong>
          </p>
          <ul className="grid grid-cols-2 gap-2 font-mono text-sm sm:grid-cols-5" data-recovery-codes>
            {codes.map((c) => (
              <li key={c} className="rounded-md bg-paper-warm px-2 py-1 text-center">{c}</li>
            ))}
          </ul>
          <button type="button" className={buttonClass} onClick={() => (setCodes(null), setStep("idle"))}>
            I have saved them
          </button>
        </div>
      ) : status.enabled ? (
        <div className="space-y-3 rounded-xl border border-paper-line bg-white p-5">
          <p className="text-sm">
            <strong>On</strong> since {fmtDate(status.enabledAt)}. {status.recoveryCodesLeft} unused recovery code{status.recoveryCodesLeft === 1 ? "" : "s"} left.
          </p>
          {step === "disable" ? (
            <form onSubmit={disable} className="space-y-3" aria-label="Turn off two-step sign-in">
              <Field label="Your password" name="password" type="password" autoComplete="current-password" value={password} onChange={setPassword} error={fields.password} required />
              <div className="flex gap-3">
                <button type="submit" className={`${dangerButtonClass} !bg-red-700 !text-white`} disabled={busy}>Turn it off</button>
                <button type="button" className={quietButtonClass} onClick={() => setStep("idle")}>Cancel</button>
              </div>
            </form>
          ) : (
            <button type="button" className={dangerButtonClass} onClick={() => setStep("disable")}>
              Turn off two-step sign-in
            </button>
          )}
        </div>
      ) : step === "password" ? (
        <form onSubmit={start} className="space-y-3 rounded-xl border border-paper-line bg-white p-5" aria-label="Set up two-step sign-in">
          <Field label="Your password" name="password" type="password" autoComplete="current-password" value={password} onChange={setPassword} error={fields.password} hint="Asked again before a change to how you sign in." required />
          <div className="flex gap-3">
            <button type="submit" className={buttonClass} disabled={busy}>Continue</button>
            <button type="button" className={quietButtonClass} onClick={() => setStep("idle")}>Cancel</button>
          </div>
        </form>
      ) : step === "scan" && enrol ? (
        <form onSubmit={confirm} className="space-y-4 rounded-xl border border-paper-line bg-white p-5" aria-label="Confirm two-step sign-in">
          <div className="flex flex-col items-start gap-5 sm:flex-row">
            {/* eslint-disable-next-line @next/next/no-img-element */}
            <img src={`data:image/svg+xml;utf8,${encodeURIComponent(enrol.qrSvg)}`} alt="QR code to scan with an authenticator app" width={176} height={176} className="rounded-md border border-paper-line" />
            <div className="min-w-0 flex-1 space-y-2 text-sm">
              <p>1. Scan the code with an authenticator app (any app that supports time-based codes).</p>
              <p>
                Cannot scan? Enter this key by hand:{" "}
                <code className="break-all rounded bg-paper-warm px-1 font-mono" data-totp-secret>
                  {enrol.secret}
                </code>
              </p>
              <p>2. Enter the 6-digit code the app shows now.</p>
            </div>
          </div>
          <Field label="Code from the app" name="code" autoComplete="one-time-code" value={code} onChange={setCode} error={fields.code} required />
          <div className="flex gap-3">
            <button type="submit" className={buttonClass} disabled={busy}>Turn on two-step sign-in</button>
            <button type="button" className={quietButtonClass} onClick={() => (setEnrol(null), setStep("idle"))}>Cancel</button>
          </div>
        </form>
      ) : (
        <div className="rounded-xl border border-paper-line bg-white p-5">
          <p className="text-sm"><strong>Off.</strong> You sign in with your password only.</p>
          <button type="button" className={`${buttonClass} mt-3`} onClick={() => setStep("password")}>
            Set up two-step sign-in
          </button>
        </div>
      )}
    </section>
  );
}
