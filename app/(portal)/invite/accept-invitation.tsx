"use client";

import { signIn } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useEffect, useState, type FormEvent } from "react";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { acceptInvitationSchema, fieldErrors, password as passwordSchema } from "@/lib/portal/schemas";
import { portalFetch, PortalFetchError } from "../_components/fetch";
import { AuthCard, buttonClass, Field, FormError, Loading, TextLink } from "../_components/ui";

interface Offer {
  organization: string;
  email: string;
  role: keyof typeof ROLE_LABELS;
  hasAccount: boolean;
}

export function AcceptInvitation({ token }: { token: string }) {
  const router = useRouter();
  const [offer, setOffer] = useState<Offer | null>(null);
  const [loadError, setLoadError] = useState<string | null>(token ? null : "This invitation link is incomplete. Open it again from the e-mail.");
  const [name, setName] = useState("");
  const [password, setPassword] = useState("");
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  useEffect(() => {
    if (!token) return;
    portalFetch<Offer>(`/api/portal/invitations/lookup?token=${encodeURIComponent(token)}`)
      .then(setOffer)
      .catch((e: PortalFetchError) => setLoadError(e.problem?.error ?? "The invitation could not be read."));
  }, [token]);

  async function submit(e: FormEvent) {
    e.preventDefault();
    if (!offer) return;
    setError(null);
    const parsed = acceptInvitationSchema.safeParse({ token, name: offer.hasAccount ? undefined : name, password });
    const local: Record<string, string> = parsed.success ? {} : fieldErrors(parsed.error);
    if (!offer.hasAccount) {
      if (!name.trim()) local.name = "Enter your name.";
      const p = passwordSchema.safeParse(password);
      if (!p.success) local.password = p.error.issues[0].message;
    }
    if (Object.keys(local).length) return setErrors(local);
    setErrors({});
    setBusy(true);
    try {
      const r = await portalFetch<{ email: string; organizationId: number }>("/api/portal/invitations/accept", { body: parsed.data });
      const s = await signIn("credentials", { email: r.email, password, redirect: false });
      if (s?.ok && !s.error) {
        router.push(`/dashboard?org=${r.organizationId}`);
        router.refresh();
      } else {
        router.push("/sign-in?notice=joined");
      }
    } catch (err) {
      const p = (err as PortalFetchError).problem;
      setError(p?.error ?? "Something went wrong.");
      if (p?.fields) setErrors(p.fields);
      setBusy(false);
    }
  }

  if (loadError) {
    return (
      <AuthCard title="Invitation" footer={<TextLink href="/sign-in">Go to sign-in</TextLink>}>
        <FormError message={loadError} />
      </AuthCard>
    );
  }
  if (!offer) return <AuthCard title="Invitation"><Loading label="Reading the invitation…" /></AuthCard>;

  return (
    <AuthCard title={`Join ${offer.organization}`}>
      <p className="text-ink-soft">
        You are invited as <strong>{ROLE_LABELS[offer.role].toLowerCase()}</strong> with the address <strong>{offer.email}</strong>.
        {offer.hasAccount ? " Enter the password of your Sumfold account to accept." : " Choose your name and a password to create your account."}
      </p>
      <form onSubmit={submit} noValidate className="space-y-4">
        <FormError message={error} />
        {offer.hasAccount ? null : <Field label="Your name" name="name" autoComplete="name" value={name} onChange={setName} error={errors.name} required />}
        <Field
          label={offer.hasAccount ? "Your password" : "Choose a password"}
          name="password"
          type="password"
          autoComplete={offer.hasAccount ? "current-password" : "new-password"}
          value={password}
          onChange={setPassword}
          error={errors.password}
          hint={offer.hasAccount ? undefined : "At least 10 characters."}
          required
        />
        <button type="submit" className={`${buttonClass} w-full`} disabled={busy}>
          {busy ? "Joining…" : `Join ${offer.organization}`}
        </button>
      </form>
    </AuthCard>
  );
}
