"use client";

import { signOut } from "next-auth/react";
import Link from "next/link";
import { usePathname } from "next/navigation";
import { useCallback, useEffect, useState, type ReactNode } from "react";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { portalFetch, PortalFetchError } from "../_components/fetch";
import { has, MeContext, type Me } from "../_components/me";
import { FormError, Loading } from "../_components/ui";

const NAV = [
  { href: "/dashboard", label: "Overview", perm: null },
  { href: "/keys", label: "API keys", perm: "keys.own" },
  { href: "/usage", label: "Usage", perm: "usage.own" },
  { href: "/members", label: "Members", perm: "members.manage" },
  { href: "/explorer", label: "Explorer", perm: "explore" },
  { href: "/datasets", label: "Datasets", perm: null },
] as const;

export function PortalShell({ children }: { children: ReactNode }) {
  const path = usePathname();
  const [me, setMe] = useState<Me | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [switching, setSwitching] = useState(false);

  const reload = useCallback(() => {
    portalFetch<Me>("/api/portal/me")
      .then((m) => {
        setMe(m);
        setError(null);
      })
      .catch((e: PortalFetchError) => {
        // A session whose person no longer exists: end it, or /sign-in would send us straight back here.
        if (e.problem?.status === 401) void signOut({ callbackUrl: "/sign-in" });
        else setError(e.problem?.error ?? "Your account could not be loaded.");
      });
  }, []);

  useEffect(reload, [reload]);

  async function switchOrg(organizationId: number) {
    setSwitching(true);
    try {
      await portalFetch("/api/portal/session/organization", { body: { organizationId } });
      // Every page's data depends on the organisation: start again from the overview.
      window.location.assign("/dashboard");
    } catch (e) {
      setError((e as PortalFetchError).problem?.error ?? "Could not switch.");
      setSwitching(false);
    }
  }

  return (
    <MeContext.Provider value={{ me, reload }}>
      <div className="border-b border-paper-line bg-paper-warm">
        <div className="mx-auto flex max-w-page flex-wrap items-center justify-between gap-3 px-5 py-2">
          <nav aria-label="Portal" className="flex flex-wrap gap-1 text-sm font-semibold">
            {NAV.filter((n) => !n.perm || has(me, n.perm)).map((n) => {
              const active = path === n.href || path.startsWith(`${n.href}/`);
              return (
                <Link
                  key={n.href}
                  href={n.href}
                  aria-current={active ? "page" : undefined}
                  className={`rounded-md px-3 py-1.5 ${active ? "bg-white text-fold-700 shadow-sm" : "text-ink-soft hover:text-fold-600"}`}
                >
                  {n.label}
                </Link>
              );
            })}
          </nav>
          {me ? (
            <div className="flex flex-wrap items-center gap-3 text-sm">
              <label className="flex items-center gap-2">
                <span className="text-ink-faint">Organisation</span>
                <select
                  aria-label="Active organisation"
                  className="rounded-md border border-paper-line bg-white px-2 py-1 font-semibold"
                  value={me.organization.id}
                  disabled={switching || me.memberships.length < 2}
                  onChange={(e) => switchOrg(Number(e.target.value))}
                >
                  {me.memberships.map((m) => (
                    <option key={m.organizationId} value={m.organizationId}>
                      {m.name} ({ROLE_LABELS[m.role].toLowerCase()})
                    </option>
                  ))}
                </select>
              </label>
              <span className="hidden text-ink-soft md:inline" title={me.user.email}>
                {me.user.name}
              </span>
              <button type="button" className="font-semibold text-fold-600 hover:underline" onClick={() => signOut({ callbackUrl: "/sign-in" })}>
                Sign out
              </button>
            </div>
          ) : null}
        </div>
      </div>
      <div className="mx-auto max-w-page px-5 py-8">
        {error ? <FormError message={error} /> : me ? children : <Loading label="Loading your organisation…" />}
      </div>
    </MeContext.Provider>
  );
}
