"use client";

import { useState } from "react";
import { createOrgSchema } from "@/lib/portal/schemas";
import { portalFetch, type PortalFetchError } from "../_components/fetch";
import { buttonClass, Field, FormError } from "../_components/ui";

/** What a signed-in person with no organisation sees: create one, or wait for an invitation (sign-out is in the bar). */
export function NoOrganisation({ onCreated }: { onCreated: (slug: string) => void }) {
  const [name, setName] = useState("");
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    const parsed = createOrgSchema.safeParse({ name });
    if (!parsed.success) return setError(parsed.error.issues[0].message);
    setBusy(true);
    try {
      const r = await portalFetch<{ organization: { slug: string } }>("/api/portal/organizations", { body: parsed.data });
      onCreated(r.organization.slug);
    } catch (err) {
      setError((err as PortalFetchError).problem?.error ?? "Could not create the organisation.");
      setBusy(false);
    }
  }

  return (
    <div className="mx-auto max-w-md space-y-4">
      <h1 className="font-display text-2xl font-bold">You are not in an organisation</h1>
      <p className="text-ink-soft">Keys, usage and datasets belong to an organisation. Create one (you will be its admin), or ask an admin of an existing one to invite you.</p>
      <form onSubmit={submit} className="space-y-3" noValidate>
        <Field label="Organisation name" name="organization" value={name} onChange={setName} />
        <FormError message={error} />
        <button type="submit" className={buttonClass} disabled={busy}>
          Create organisation
        </button>
      </form>
    </div>
  );
}
