"use client";

import { OrgLink } from "../../_components/org-link";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { has, useMe } from "../../_components/me";
import { PageHeader } from "../../_components/ui";

const CARDS = [
  { href: "/keys", perm: "keys.own", title: "API keys", body: "Issue keys for your integrations, rotate them with a grace period, revoke them at once." },
  { href: "/usage", perm: "usage.own", title: "Usage", body: "Requests, compute units, errors and latency by day, key and endpoint, against the monthly quota." },
  { href: "/members", perm: "members.manage", title: "Members", body: "Invite colleagues as admins, developers or billing contacts; change roles; remove people." },
  { href: "/explorer", perm: "explore", title: "Explorer", body: "Build a model, see its density, quantiles and moments, and copy the request for your code." },
  { href: "/docs", perm: null, title: "API reference", body: "Every endpoint, its request and response schemas, and the error shapes." },
] as const;

export function Overview() {
  const { me } = useMe();
  if (!me) return null;
  return (
    <div className="space-y-8">
      <PageHeader
        title={`Hello, ${me.user.name.split(" ")[0]}`}
        lead={
          <>
            You are working in <strong>{me.organization.name}</strong> as <strong>{ROLE_LABELS[me.role].toLowerCase()}</strong>.
          </>
        }
      />
      <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
        {CARDS.filter((c) => !c.perm || has(me, c.perm)).map((c) => (
          <li key={c.href}>
            <OrgLink href={c.href} className="block h-full rounded-xl border border-paper-line bg-white p-5 shadow-sm hover:border-fold-500">
              <h2 className="font-display text-lg font-semibold">{c.title}</h2>
              <p className="mt-1 text-sm text-ink-soft">{c.body}</p>
            </OrgLink>
          </li>
        ))}
      </ul>
    </div>
  );
}
