"use client";

import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useState, type FormEvent } from "react";
import { fieldErrors, signInSchema } from "@/lib/portal/schemas";
import { portalFetch } from "../_components/fetch";
import { AuthCard, buttonClass, Field, FormError, Notice, quietButtonClass, TextLink } from "../_components/ui";

const NOTICES: Record<string, string> = {
  verified: "Your address is confirmed. Sign in to continue.",
  reset: "Your password is changed. Sign in with the new one.",
  joined: "You have joined the organisation. Sign in to continue.",
};

export function SignInForm({ next, notice }: { next: string; notice?: string }) {
  const router = useRouter();
  const [email, setEmail] = useState("");
  const [password, setPassword] = useState("");
  const [code, setCode] = useState("");
  const [needsCode, setNeedsCode] = useState(false);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [unverified, setUnverified] = useState(false);
  const [resent, setResent] = useState(false);
  const [busy, setBusy] = useState(false);

  async function submit(e: FormEvent) {
    e.preventDefault();
    setError(null);
    setUnverified(false);
    const parsed = signInSchema.safeParse({ email, password });
    if (!parsed.success) return setErrors(fieldErrors(parsed.error));
    setErrors({});
    setBusy(true);
    if (needsCode && !code.trim()) return setErrors({ code: "Enter the 6-digit code from your authenticator app, or a recovery code." });
    const res = await signIn("credentials", { ...parsed.data, ...(needsCode ? { code: code.trim() } : {}), redirect: false });
    setBusy(false);
    if (res?.ok && !res.error) {
      router.push(next);
      router.refresh();
      return;
    }
    if (res?.error === "TwoFactorRequired") {
      setNeedsCode(true);
      setError(null);
      return;
    }
    if (res?.error === "TwoFactorInvalid") {
      setCode("");
      setError("That code is not right, or was used already. Enter the current code from your app, or an unused recovery code.");
      return;
    }
    if (res?.error === "Unverified") {
      setUnverified(true);
      setError("Confirm your e-mail address first: open the link we sent you.");
    } else if (res?.error === "Throttled") {
      setError("Too many sign-in attempts for this address. Wait 15 minutes, or reset your password.");
    } else {
      setError("That e-mail and password do not match an account.");
    }
  }

  async function resend() {
    await portalFetch("/api/portal/auth/resend-verification", { body: { email } }).catch(() => {});
    setResent(true);
  }

  return (
    <AuthCard
      title="Sign in to Sumfold"
      footer={
        <>
          New here? <TextLink href="/sign-up">Create an account</TextLink> · <TextLink href="/reset">Forgot your password?</TextLink>
        </>
      }
    >
      {notice && NOTICES[notice] ? <Notice tone="success">{NOTICES[notice]}</Notice> : null}
      <form onSubmit={submit} noValidate className="space-y-4">
        <FormError message={error} />
        {unverified ? (
          resent ? (
            <Notice>A new confirmation link is on its way.</Notice>
          ) : (
            <button type="button" className={quietButtonClass} onClick={resend}>
              Send the confirmation link again
            </button>
          )
        ) : null}
        <Field label="E-mail" name="email" type="email" autoComplete="email" value={email} onChange={setEmail} error={errors.email} required />
        <Field label="Password" name="password" type="password" autoComplete="current-password" value={password} onChange={setPassword} error={errors.password} required />
        {needsCode ? (
          <>
            <Notice>This account uses two-step sign-in. Enter the code your authenticator app shows for Sumfold.</Notice>
            <Field
              label="Authentication code"
              name="code"
              autoComplete="one-time-code"
              value={code}
              onChange={setCode}
              error={errors.code}
              hint="6 digits from the app, or one of your recovery codes (e.g. k3f9-2hq8-x7vd)."
              required
            />
          </>
        ) : null}
        <button type="submit" className={`${buttonClass} w-full`} disabled={busy}>
          {busy ? "Signing in…" : "Sign in"}
        </button>
      </form>
    </AuthCard>
  );
}
