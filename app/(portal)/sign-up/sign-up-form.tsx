"use client";

import { useState, type FormEvent } from "react";
import { fieldErrors, signUpSchema } from "@/lib/portal/schemas";
import { portalFetch, PortalFetchError } from "../_components/fetch";
import { AuthCard, buttonClass, Field, FormError, Notice, TextLink } from "../_components/ui";

export function SignUpForm({ mailboxUrl }: { mailboxUrl: string | null }) {
  const [v, setV] = useState({ name: "", email: "", organization: "", password: "" });
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const set = (k: keyof typeof v) => (value: string) => setV((s) => ({ ...s, [k]: value }));

  async function submit(e: FormEvent) {
    e.preventDefault();
    setError(null);
    const parsed = signUpSchema.safeParse(v);
    if (!parsed.success) return setErrors(fieldErrors(parsed.error));
    setErrors({});
    setBusy(true);
    try {
      await portalFetch("/api/portal/auth/sign-up", { body: parsed.data });
      setDone(parsed.data.email);
    } catch (err) {
      const p = (err as PortalFetchError).problem;
      setError(p?.error ?? "Something went wrong.");
      if (p?.fields) setErrors(p.fields);
    } finally {
      setBusy(false);
    }
  }

  if (done) {
    return (
      <AuthCard title="Check your inbox">
        <Notice tone="success">
          We sent a confirmation link to <strong>{done}</strong>. Open it to finish; it works once, for 24 hours.
        </Notice>
        {mailboxUrl ? (
          <p className="text-sm text-ink-soft">
            This copy of Sumfold runs locally, so the message waits in the{" "}
            <a className="font-semibold text-fold-600 underline" href={mailboxUrl} target="_blank" rel="noreferrer">
              local mailbox
            </a>
            .
          </p>
        ) : null}
      </AuthCard>
    );
  }

  return (
    <AuthCard title="Create your Sumfold account" footer={<>Have an account? <TextLink href="/sign-in">Sign in</TextLink></>}>
      <p className="text-sm text-ink-soft">You become the admin of a new organisation on the Starter plan. Invite colleagues once you are in.</p>
      <form onSubmit={submit} noValidate className="space-y-4">
        <FormError message={error} />
        <Field label="Your name" name="name" autoComplete="name" value={v.name} onChange={set("name")} error={errors.name} required />
        <Field label="Work e-mail" name="email" type="email" autoComplete="email" value={v.email} onChange={set("email")} error={errors.email} required />
        <Field label="Organisation" name="organization" autoComplete="organization" value={v.organization} onChange={set("organization")} error={errors.organization} required />
        <Field
          label="Password"
          name="password"
          type="password"
          autoComplete="new-password"
          value={v.password}
          onChange={set("password")}
          error={errors.password}
          hint="At least 10 characters."
          required
        />
        <button type="submit" className={`${buttonClass} w-full`} disabled={busy}>
          {busy ? "Creating…" : "Create account"}
        </button>
      </form>
    </AuthCard>
  );
}
