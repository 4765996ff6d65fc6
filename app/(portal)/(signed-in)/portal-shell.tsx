"use client";

import { signOut } from "next-auth/react";
import Link from "next/link";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { useCallback, useEffect, useState, type ReactNode } from "react";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { ORG_HEADER, setActiveOrg, withOrg } from "../_components/fetch";
import { has, MeContext, type Me } from "../_components/me";
import { FormError, Loading } from "../_components/ui";
import { NoOrganisation } from "./no-organisation";

const NAV = [
  { href: "/dashboard", label: "Overview", perm: null },
  { href: "/quickstart", label: "Quickstart", perm: null },
  { href: "/keys", label: "API keys", perm: "keys.own" },
  { href: "/usage", label: "Usage", perm: "usage.own" },
  { href: "/billing", label: "Billing", perm: "plan.read" },
  { href: "/members", label: "Members", perm: "members.manage" },
  { href: "/audit", label: "Audit log", perm: "audit.read" },
  { href: "/explorer", label: "Explorer", perm: "explore" },
  { href: "/models", label: "Models", perm: "models.read" },
  { href: "/datasets", label: "Datasets", perm: null },
] as const;

/**
 * The signed-in frame. The organisation a page works in is part of its address (`?org=<slug>`): the shell reads
 * it, loads the person's role there, hands it to every portal call of this tab, and keeps it in the address
 * as the person moves between pages. Two tabs in two organisations never see each other's choice.
 */
export function PortalShell({ children }: { children: ReactNode }) {
  const path = usePathname();
  const search = useSearchParams();
  const router = useRouter();
  const urlOrg = search.get("org");
  const [me, setMe] = useState<Me | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [noOrg, setNoOrg] = useState(false);

  const load = useCallback((org: string | null) => {
    fetch("/api/portal/me", { headers: org ? { [ORG_HEADER]: org } : {}, cache: "no-store", credentials: "same-origin" })
      .then(async (res) => {
        const body = (await res.json().catch(() => ({}))) as Me & { error?: string };
        if (res.ok) {
          setActiveOrg(body.organization.slug);
          setMe(body);
          setError(null);
          setNoOrg(false);
          return;
        }
        // A session whose person no longer exists: end it, or /sign-in would send us straight back here.
        if (res.status === 401) void signOut({ callbackUrl: "/sign-in" });
        else if (res.status === 403) setNoOrg(true);
        else setError(body.error ?? "Your account could not be loaded.");
      })
      .catch(() => setError("The server could not be reached. Check your connection and try again."));
  }, []);

  // The first load, and a new load whenever the address names another organisation (back/forward, a pasted link).
  const current = me?.organization.slug ?? null;
  useEffect(() => {
    if (!me || (urlOrg && urlOrg !== current && urlOrg !== String(me.organization.id))) load(urlOrg);
  }, [urlOrg, me, current, load]);

  // Pages reached by a link that did not carry the organisation get it back in their address.
  useEffect(() => {
    if (me && !urlOrg) router.replace(withOrg(`${path}${window.location.search}${window.location.hash}`, me.organization.slug), { scroll: false });
  }, [me, urlOrg, path, router]);

  const reload = useCallback(() => load(current ?? urlOrg), [load, current, urlOrg]);

  function switchOrg(slug: string) {
    // Stay in the same section; an item's own page (a dataset, a model) belongs to the organisation left behind.
    const section = `/${path.split("/")[1] ?? "dashboard"}`;
    window.location.assign(withOrg(section, slug));
  }

  const ready = me && (!urlOrg || urlOrg === me.organization.slug || urlOrg === String(me.organization.id));

  return (
    <MeContext.Provider value={{ me, reload }}>
      <div className="border-b border-paper-line bg-paper-warm">
        <div className="mx-auto flex max-w-page flex-wrap items-center justify-between gap-3 px-5 py-2">
          <nav aria-label="Portal" className="flex flex-wrap gap-1 text-sm font-semibold">
            {me
              ? NAV.filter((n) => !n.perm || has(me, n.perm)).map((n) => {
                  const active = path === n.href || path.startsWith(`${n.href}/`);
                  return (
                    <Link
                      key={n.href}
                      href={withOrg(n.href, me.organization.slug)}
                      aria-current={active ? "page" : undefined}
                      className={`rounded-md px-3 py-1.5 ${active ? "bg-white text-fold-700 shadow-sm" : "text-ink-soft hover:text-fold-600"}`}
                    >
                      {n.label}
                    </Link>
                  );
                })
              : null}
          </nav>
          <div className="flex flex-wrap items-center gap-3 text-sm">
            {me ? (
              <>
                <label className="flex items-center gap-2">
                  <span className="text-ink-faint">Organisation</span>
                  <select
                    aria-label="Active organisation"
                    className="max-w-[14rem] rounded-md border border-paper-line bg-white px-2 py-1 font-semibold md:max-w-[22rem]"
                    value={me.organization.slug}
                    disabled={me.memberships.length < 2}
                    onChange={(e) => switchOrg(e.target.value)}
                  >
                    {me.memberships.map((m) => (
                      <option key={m.organizationId} value={m.slug}>
                        {m.name} ({ROLE_LABELS[m.role].toLowerCase()})
                      </option>
                    ))}
                  </select>
                </label>
                <Link href={withOrg("/account", me.organization.slug)} className="text-ink-soft hover:text-fold-600 hover:underline" title={`${me.user.email}: sessions and two-step sign-in`} aria-current={path === "/account" ? "page" : undefined}>
                  <span className="hidden md:inline">{me.user.name} · </span>Security
                </Link>
              </>
            ) : null}
            <button type="button" className="font-semibold text-fold-600 hover:underline" onClick={() => signOut({ callbackUrl: "/sign-in" })}>
              Sign out
            </button>
          </div>
        </div>
      </div>
      <div className="mx-auto max-w-page px-5 py-8">
        {noOrg ? (
          <NoOrganisation onCreated={(slug) => window.location.assign(withOrg("/dashboard", slug))} />
        ) : error ? (
          <FormError message={error} />
        ) : ready ? (
          <div key={me.organization.slug}>{children}</div>
        ) : (
          <Loading label="Loading your organisation…" />
        )}
      </div>
    </MeContext.Provider>
  );
}

