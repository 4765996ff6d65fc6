"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { portalFetch, PortalFetchError } from "../_components/fetch";
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
      await portalFetch("/api/portal/auth/verify", { body: { token } });
      router.push("/sign-in?notice=verified");
    } catch (e) {
      setError((e as PortalFetchError).problem?.error ?? "Something went wrong.");
      setBusy(false);
    }
  }

  return (
    <AuthCard title="Confirm your e-mail address" footer={<TextLink href="/sign-in">Back to sign-in</TextLink>}>
      <FormError message={error} />
      {token ? (
        <>
          <p className="text-ink-soft">One click and your account is ready.</p>
          <button type="button" className={`${buttonClass} w-full`} onClick={confirm} disabled={busy}>
            {busy ? "Confirming…" : "Confirm my address"}
          </button>
        </>
      ) : null}
    </AuthCard>
  );
}
