"use client";

import { useCallback, useEffect, useState } from "react";
import { portalFetch, PortalFetchError, withOrg } from "../../_components/fetch";
import { OrgLink } from "../../_components/org-link";
import { buttonClass, Empty, FormError, Loading, Notice, PageHeader, quietButtonClass } from "../../_components/ui";
import { day, lastDay, money, STATUS_LABEL, units } from "./format";
import { Contacts, DetailsForm, Section } from "./billing-forms";
import { LinesTable, type Line } from "./lines-table";

interface PlanRow {
  code: string;
  label: string;
  rank: number;
  monthlyFeeMinor: number;
  includedUnits: number;
  overagePerMillionMinor: number;
  requestsPerSecond: number;
  monthlyUnits: number;
}
interface Summary {
  role: "admin" | "developer" | "billing";
  organization: string;
  plan: { code: string; label: string };
  limits: { label: string; requestsPerSecond: number; monthlyUnits: number };
  quota: { monthlyUnits: number; usedUnits: number };
  status: "active" | "past_due" | "restricted";
  currency?: string;
  pendingPlan?: { code: string; label: string; effectiveAt: string } | null;
  period?: { start: string; end: string };
  graceEndsAt?: string | null;
  card?: { brand: string; last4: string; expMonth: number; expYear: number } | null;
  details?: { billingName: string; billingAddress: string; taxId: string };
  upcoming?: { lines: Line[]; totalMinor: number; projectedUnits: number; projectedTotalMinor: number };
  plans?: PlanRow[];
  contacts?: { id: number; email: string; name: string }[];
  invoices?: { id: number; number: string; kind: string; periodStart: string; periodEnd: string; totalMinor: number; currency: string; status: string }[];
}

const CHECKOUT_NOTICE: Record<string, string> = {
  upgraded: "Your card is saved and the new plan applies now.",
  scheduled: "Your card is saved. The plan change takes effect at the end of the period.",
  unchanged: "Your card is saved.",
  card_saved: "Your new card is saved.",
  already: "This checkout was already applied.",
  open: "The checkout was not finished, so nothing changed.",
  cancelled: "The checkout was cancelled, so nothing changed.",
  declined: "The card was saved, but the charge for the new plan was declined. The plan is unchanged.",
};


export function BillingView() {
  const [data, setData] = useState<Summary | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [busy, setBusy] = useState<string | null>(null);

  const load = useCallback(() => {
    portalFetch<Summary>("/api/portal/billing")
      .then((d) => (setData(d), setError(null)))
      .catch((e: PortalFetchError) => setError(e.problem?.error ?? "Billing could not be loaded."));
  }, []);
  useEffect(() => {
    const q = new URLSearchParams(window.location.search).get("checkout");
    if (q) setNotice(CHECKOUT_NOTICE[q] ?? null);
    load();
  }, [load]);

  const act = async (label: string, fn: () => Promise<void>) => {
    setBusy(label);
    setError(null);
    try {
      await fn();
    } catch (e) {
      setError((e as PortalFetchError).problem?.error ?? "That did not work; please try again.");
    } finally {
      setBusy(null);
    }
  };

  const choosePlan = (p: PlanRow) =>
    act(`plan-${p.code}`, async () => {
      const out = await portalFetch<{ action: string; url?: string; prorationMinor?: number; effectiveAt?: string }>("/api/portal/billing/plan", { body: { plan: p.code } });
      if (out.action === "checkout" && out.url) {
        window.location.assign(out.url);
        return;
      }
      if (out.action === "upgraded") setNotice(`You are now on ${p.label}.${out.prorationMinor ? ` ${money(out.prorationMinor)} for the rest of this period was charged to your card.` : ""}`);
      else if (out.action === "scheduled") setNotice(`${p.label} takes effect on ${day(out.effectiveAt!)}. Until then nothing changes.`);
      else setNotice(`You stay on ${p.label}.`);
      load();
    });

  const updateCard = () =>
    act("card", async () => {
      const out = await portalFetch<{ url: string }>("/api/portal/billing/payment-method", { body: {} });
      window.location.assign(out.url);
    });

  const pay = (id: number) =>
    act(`pay-${id}`, async () => {
      await portalFetch(`/api/portal/billing/invoices/${id}/pay`, { body: {} });
      setNotice("Paid. Thank you.");
      load();
    });

  if (!data && !error) return <Loading label="Loading billing…" />;
  if (!data) return <FormError message={error} />;

  const used = data.quota.usedUnits;
  const current = data.plans?.find((p) => p.code === data.plan.code);
  const pct = Math.min(100, Math.round((used * 100) / Math.max(1, data.quota.monthlyUnits)));
  const quota = (
    <Section title="Plan and quota">
      <p className="text-lg">
        <span className="font-semibold" data-testid="current-plan">
          {data.plan.label}
        </span>
        {data.status !== "active" && data.limits.label !== data.plan.label ? <span className="text-ink-soft"> (limits of the {data.limits.label} plan apply for now)</span> : null}
      </p>
      <p className="mt-1 text-sm text-ink-soft">
        {units(data.limits.requestsPerSecond)} requests per second per key · {units(used)} of {units(data.quota.monthlyUnits)} compute units used this month
      </p>
      <div className="mt-3 h-2 w-full overflow-hidden rounded bg-paper-warm" role="meter" aria-label="Compute units used this month" aria-valuenow={pct} aria-valuemin={0} aria-valuemax={100}>
        <div className="h-2 bg-fold-600" style={{ width: `${pct}%` }} />
      </div>
      {/* the bar runs to the monthly cap; what the fee covers ends earlier, and a billing contact needs to see where */}
      {current && current.includedUnits < data.quota.monthlyUnits ? (
        <p className="mt-2 text-xs text-ink-faint" data-testid="included-units">
          The fee includes {units(current.includedUnits)} units; past them each further million costs{" "}
          {money(current.overagePerMillionMinor, data.currency ?? "GBP")}, up to the cap of {units(data.quota.monthlyUnits)}.
          {used > current.includedUnits ? ` ${units(used - current.includedUnits)} extra units so far.` : ""}
        </p>
      ) : null}
      {data.pendingPlan ? (
        <p className="mt-3 text-sm">
          Changes to <strong>{data.pendingPlan.label}</strong> on {day(data.pendingPlan.effectiveAt)}.
        </p>
      ) : null}
    </Section>
  );

  if (!data.plans) {
    return (
      <div className="space-y-6">
        <PageHeader title="Billing" lead="Your organisation's plan and this month's compute units. Admins and billing contacts manage payment." />
        {quota}
      </div>
    );
  }

  const currency = data.currency ?? "GBP";
  return (
    <div className="space-y-6">
      <PageHeader title="Billing" lead={`Plan, usage, payment and invoices of ${data.organization}. Amounts in ${currency}.`} />
      {notice ? <Notice tone="success">{notice}</Notice> : null}
      <FormError message={error} />
      {data.status !== "active" ? (
        <div role="alert" className="rounded-md border border-red-300 bg-red-50 px-4 py-3 text-sm text-red-800">
          {data.status === "past_due" ? (
            <>A payment failed and an invoice is past due. Pay it or update the card by {data.graceEndsAt ? day(data.graceEndsAt) : "the end of the grace period"}; after that the Free plan&rsquo;s limits apply until it is paid. No data is removed.</>
          ) : (
            <>An invoice is unpaid after the grace period, so the Free plan&rsquo;s limits apply. Paying restores the {data.plan.label} plan within seconds.</>
          )}
        </div>
      ) : null}

      <div className="grid gap-6 lg:grid-cols-2">
        {quota}
        <Section title="This period">
          {data.period && data.upcoming ? (
            <>
              <p className="text-sm text-ink-soft">
                {day(data.period.start)} – {lastDay(data.period.end)}. The period&rsquo;s invoice is issued and charged when it ends.
              </p>
              <dl className="mt-3 grid grid-cols-2 gap-2 text-sm">
                <dt className="text-ink-soft">Bill so far</dt>
                <dd className="text-right font-mono tabular-nums" data-testid="bill-so-far">
                  {money(data.upcoming.totalMinor, currency)}
                </dd>
                <dt className="text-ink-soft">Projected for the period</dt>
                <dd className="text-right font-mono tabular-nums" data-testid="bill-projected">
                  {money(data.upcoming.projectedTotalMinor, currency)}
                </dd>
                <dt className="text-ink-soft">Projected compute units</dt>
                <dd className="text-right font-mono tabular-nums">{units(data.upcoming.projectedUnits)}</dd>
              </dl>
              <details className="mt-3 text-sm">
                <summary className="cursor-pointer font-semibold text-fold-700">Lines so far</summary>
                <LinesTable lines={data.upcoming.lines} currency={currency} caption="The upcoming invoice's lines so far" />
              </details>
              <p className="mt-2 text-xs text-ink-faint">The projection extends this period&rsquo;s units so far at the same daily rate.</p>
            </>
          ) : null}
        </Section>
      </div>

      <Section title="Plans">
        <div className="overflow-x-auto">
          <table className="w-full text-sm">
            <caption className="sr-only">Plans compared</caption>
            <thead>
              <tr className="border-b border-paper-line text-left text-ink-soft">
                <th className="py-2 pr-3 font-semibold">Plan</th>
                <th className="py-2 pr-3 text-right font-semibold">Monthly fee</th>
                <th className="py-2 pr-3 text-right font-semibold">Included units</th>
                <th className="py-2 pr-3 text-right font-semibold">Per extra million</th>
                <th className="py-2 pr-3 text-right font-semibold">Requests / s / key</th>
                <th className="py-2 pr-3 text-right font-semibold">Monthly cap</th>
                <th className="py-2 font-semibold">
                  <span className="sr-only">Change</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {data.plans.map((p) => {
                const isCurrent = p.code === data.plan.code;
                const up = current ? p.rank > current.rank : true;
                const label = isCurrent ? (data.pendingPlan ? `Keep ${p.label}` : "Current plan") : p.monthlyFeeMinor === 0 ? "Cancel to Free" : up ? `Upgrade to ${p.label}` : `Downgrade to ${p.label}`;
                return (
                  <tr key={p.code} className={`border-b border-paper-line/60 ${isCurrent ? "bg-fold-50" : ""}`}>
                    <th scope="row" className="py-2 pr-3 text-left font-semibold">
                      {p.label}
                    </th>
                    <td className="py-2 pr-3 text-right font-mono tabular-nums">{money(p.monthlyFeeMinor, currency)}</td>
                    <td className="py-2 pr-3 text-right font-mono tabular-nums">{units(p.includedUnits)}</td>
                    <td className="py-2 pr-3 text-right font-mono tabular-nums">{p.overagePerMillionMinor ? money(p.overagePerMillionMinor, currency) : "—"}</td>
                    <td className="py-2 pr-3 text-right font-mono tabular-nums">{units(p.requestsPerSecond)}</td>
                    <td className="py-2 pr-3 text-right font-mono tabular-nums">{units(p.monthlyUnits)}</td>
                    <td className="py-2 text-right">
                      <button
                        type="button"
                        className={isCurrent && !data.pendingPlan ? quietButtonClass : up ? buttonClass : quietButtonClass}
                        disabled={(isCurrent && !data.pendingPlan) || busy !== null || data.status !== "active"}
                        onClick={() => void choosePlan(p)}
                      >
                        {busy === `plan-${p.code}` ? "Working…" : label}
                      </button>
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        <p className="mt-3 text-xs text-ink-faint">
          Upgrades apply at once; the fee difference for the rest of the period is charged now. Downgrades and cancelling take effect at the end of the period. A paid plan without a saved card opens the payment provider&rsquo;s secure card page.
        </p>
      </Section>

      <div className="grid gap-6 lg:grid-cols-2">
        <Section
          title="Payment method"
          actions={
            <button type="button" className={quietButtonClass} onClick={() => void updateCard()} disabled={busy !== null}>
              {data.card ? "Replace card" : "Add a card"}
            </button>
          }
        >
          {data.card ? (
            <p data-testid="saved-card">
              <span className="font-semibold capitalize">{data.card.brand}</span> ending {data.card.last4}, expires {String(data.card.expMonth).padStart(2, "0")}/{data.card.expYear}
            </p>
          ) : (
            <p className="text-ink-soft">No card saved.</p>
          )}
        </Section>
        <DetailsForm initial={data.details!} onSaved={() => setNotice("Billing details saved. They appear on invoices from now on.")} />
      </div>

      <Section title="Invoices">
        {data.invoices && data.invoices.length > 0 ? (
          <div className="overflow-x-auto">
            <table className="w-full text-sm">
              <caption className="sr-only">Invoices</caption>
              <thead>
                <tr className="border-b border-paper-line text-left text-ink-soft">
                  <th className="py-2 pr-3 font-semibold">Number</th>
                  <th className="py-2 pr-3 font-semibold">For</th>
                  <th className="py-2 pr-3 text-right font-semibold">Total</th>
                  <th className="py-2 pr-3 font-semibold">Status</th>
                  <th className="py-2 font-semibold">
                    <span className="sr-only">Actions</span>
                  </th>
                </tr>
              </thead>
              <tbody>
                {data.invoices.map((i) => (
                  <tr key={i.id} className="border-b border-paper-line/60" data-invoice={i.number}>
                    <td className="py-2 pr-3 font-mono">
                      <OrgLink href={`/billing/invoices/${i.id}`} className="font-semibold text-fold-600 hover:underline">
                        {i.number}
                      </OrgLink>
                    </td>
                    <td className="py-2 pr-3">
                      {i.kind === "period" ? `${day(i.periodStart)} – ${lastDay(i.periodEnd)}` : "Plan upgrade (prorated)"}
                    </td>
                    <td className="py-2 pr-3 text-right font-mono tabular-nums">{money(i.totalMinor, i.currency)}</td>
                    <td className="py-2 pr-3">{STATUS_LABEL[i.status] ?? i.status}</td>
                    <td className="flex justify-end gap-2 py-2">
                      {i.status === "open" ? (
                        <button type="button" className={buttonClass} disabled={busy !== null} onClick={() => void pay(i.id)}>
                          Pay {i.number} now
                        </button>
                      ) : null}
                      <a className={quietButtonClass} href={withOrg(`/api/portal/billing/invoices/${i.id}/pdf`)} download>
                        PDF<span className="sr-only"> of {i.number}</span>
                      </a>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        ) : (
          <Empty title="No invoices yet">The first one is issued when this period ends.</Empty>
        )}
      </Section>

      <Contacts initial={data.contacts ?? []} />
    </div>
  );
}
