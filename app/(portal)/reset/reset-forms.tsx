"use client";

import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { emailOnlySchema, fieldErrors, resetSchema } from "@/lib/portal/schemas";
import { portalFetch, PortalFetchError } from "../_components/fetch";
import { AuthCard, buttonClass, Field, FormError, Notice, TextLink } from "../_components/ui";

/** Without a token: ask for a reset link. With one: choose the new password. */
export function ResetForms({ token }: { token: string | null }) {
  const router = useRouter();
  const [email, setEmail] = useState("");
  const [password, setPassword] = useState("");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [sent, setSent] = useState(false);
  const [busy, setBusy] = useState(false);

  async function request(e: FormEvent) {
    e.preventDefault();
    const parsed = emailOnlySchema.safeParse({ email });
    if (!parsed.success) return setErrors(fieldErrors(parsed.error));
    setErrors({});
    setBusy(true);
    try {
      await portalFetch("/api/portal/auth/reset-request", { body: parsed.data });
      setSent(true);
    } catch (err) {
      setError((err as PortalFetchError).problem?.error ?? "Something went wrong.");
    } finally {
      setBusy(false);
    }
  }

  async function choose(e: FormEvent) {
    e.preventDefault();
    setError(null);
    const parsed = resetSchema.safeParse({ token, password });
    if (!parsed.success) return setErrors(fieldErrors(parsed.error));
    setErrors({});
    setBusy(true);
    try {
      await portalFetch("/api/portal/auth/reset", { body: parsed.data });
      router.push("/sign-in?notice=reset");
    } catch (err) {
      setError((err as PortalFetchError).problem?.error ?? "Something went wrong.");
      setBusy(false);
    }
  }

  if (token) {
    return (
      <AuthCard title="Choose a new password" footer={<TextLink href="/sign-in">Back to sign-in</TextLink>}>
        <form onSubmit={choose} noValidate className="space-y-4">
          <FormError message={error} />
          <Field
            label="New password"
            name="password"
            type="password"
            autoComplete="new-password"
            value={password}
            onChange={setPassword}
            error={errors.password}
            hint="At least 10 characters."
            required
          />
          <button type="submit" className={`${buttonClass} w-full`} disabled={busy}>
            {busy ? "Saving…" : "Save the new password"}
          </button>
        </form>
      </AuthCard>
    );
  }

  return (
    <AuthCard title="Reset your password" footer={<TextLink href="/sign-in">Back to sign-in</TextLink>}>
      {sent ? (
        <Notice tone="success">If an account uses {email}, a reset link is on its way. It works once, for 1 hour.</Notice>
      ) : (
        <form onSubmit={request} noValidate className="space-y-4">
          <FormError message={error} />
          <p className="text-sm text-ink-soft">We will e-mail you a link to choose a new password.</p>
          <Field label="E-mail" name="email" type="email" autoComplete="email" value={email} onChange={setEmail} error={errors.email} required />
          <button type="submit" className={`${buttonClass} w-full`} disabled={busy}>
            {busy ? "Sending…" : "Send the reset link"}
          </button>
        </form>
      )}
    </AuthCard>
  );
}
