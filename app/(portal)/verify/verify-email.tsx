"use client";

import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { AuthCard, buttonClass, FormError, TextLink } from "../_components/ui";

// Confirming takes a click (a POST), so mail scanners that prefetch links do not spend the token.
export function VerifyEmail({ token }: { token: string }) {
  const router = useRouter();
  const [error, setError] = useState<string | null>(token ? null : "This link is incomplete. Open it again from the e-mail.");
  const [busy, setBusy] = useState(false);

  async function confirm() {
    setBusy(true);
    setError(null);
    try {
      // Confirms the address and opens the session in one step; the quickstart is the first stop.
      const r = await signIn("email-link", { token, redirect: false });
      if (r?.ok && !r.error) {
        router.push("/quickstart");
        router.refresh();
        return;
      }
      setError(r?.error === "LinkUsed" ? "This confirmation link is used or expired. Sign in to ask for a new one." : "Something went wrong; try the link again.");
    } catch {
      setError("The server could not be reached. Check your connection and try again.");
    }
    setBusy(false);
  }

  return (
    <AuthCard title="Confirm your e-mail address" footer={<TextLink href="/sign-in">Back to sign-in</TextLink>}>
      <FormError message={error} />
      {token ? (
        <>
          <p className="text-ink-soft">One click and your account is ready: you are signed in and taken to the quickstart.</p>
          <button type="button" className={`${buttonClass} w-full`} onClick={confirm} disabled={busy}>
            {busy ? "Confirming…" : "Confirm my address"}
          </button>
        </>
      ) : null}
    </AuthCard>
  );
}
