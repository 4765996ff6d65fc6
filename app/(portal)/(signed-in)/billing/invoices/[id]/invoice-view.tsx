"use client";

import { useCallback, useEffect, useState } from "react";
import { Caution } from "@/app/_components/caution";
import { portalFetch, PortalFetchError, withOrg } from "../../../../_components/fetch";
import { buttonClass, FormError, Loading, Notice, PageHeader, quietButtonClass, TextLink } from "../../../../_components/ui";
import { day, lastDay, money, STATUS_LABEL, units } from "../../format";
import { LinesTable } from "../../lines-table";

interface Detail {
  invoice: { id: number; number: string; kind: string; planCode: string; periodStart: string; periodEnd: string; currency: string; totalMinor: number; unitsMetered: number; status: string; paidAt: string | null; lastPaymentError: string | null; createdAt: string };
  lines: { position: number; description: string; quantity: number; unitLabel: string; amountMinor: number }[];
  billedTo: { name: string; address: string; taxId: string };
}

export function InvoiceView({ id }: { id: string }) {
  const [d, setD] = useState<Detail | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const load = useCallback(() => {
    portalFetch<Detail>(`/api/portal/billing/invoices/${encodeURIComponent(id)}`)
      .then((x) => (setD(x), setError(null)))
      .catch((e: PortalFetchError) => setError(e.problem?.error ?? "The invoice could not be loaded."));
  }, [id]);
  useEffect(load, [load]);

  if (!d && !error) return <Loading label="Loading the invoice…" />;
  if (!d)
    return (
      <div className="space-y-4">
        <FormError message={error} />
        <TextLink href={withOrg("/billing")}>Back to billing</TextLink>
      </div>
    );
  const i = d.invoice;
  const pay = async () => {
    setBusy(true);
    try {
      await portalFetch(`/api/portal/billing/invoices/${i.id}/pay`, { body: {} });
      setNotice("Paid. Thank you.");
      load();
    } catch (e) {
      setError((e as PortalFetchError).problem?.error ?? "The payment did not go through.");
    } finally {
      setBusy(false);
    }
  };
  return (
    <div className="space-y-6">
      <PageHeader
        title={`Invoice ${i.number}`}
        lead={i.kind === "period" ? `${day(i.periodStart)} – ${lastDay(i.periodEnd)}` : "Plan upgrade, prorated for the rest of the period"}
        actions={
          <div className="flex gap-2">
            {i.status === "open" ? (
              <button type="button" className={buttonClass} disabled={busy} onClick={() => void pay()}>
                Pay now
              </button>
            ) : null}
            <a className={quietButtonClass} href={withOrg(`/api/portal/billing/invoices/${i.id}/pdf`)} download>
              Download PDF
            </a>
          </div>
        }
      />
      {notice ? <Notice tone="success">{notice}</Notice> : null}
      <FormError message={error} />
      <section className="grid gap-6 rounded-xl border border-paper-line bg-white p-5 shadow-sm sm:grid-cols-2">
        <div>
          <h2 className="text-sm font-semibold text-ink-soft">Billed to</h2>
          <p className="mt-1 font-semibold">{d.billedTo.name}</p>
          {d.billedTo.address ? <p className="text-sm">{d.billedTo.address}</p> : null}
          {d.billedTo.taxId ? <p className="text-sm">Tax id: {d.billedTo.taxId}</p> : null}
        </div>
        <dl className="grid grid-cols-2 gap-1 text-sm">
          <dt className="text-ink-soft">Issued</dt>
          <dd>{day(i.createdAt)}</dd>
          <dt className="text-ink-soft">Status</dt>
          <dd data-testid="invoice-status">{STATUS_LABEL[i.status] ?? i.status}{i.paidAt ? `, ${day(i.paidAt)}` : ""}</dd>
          {i.kind === "period" ? (
            <>
              <dt className="text-ink-soft">Compute units metered</dt>
              <dd className="font-mono tabular-nums">{units(i.unitsMetered)}</dd>
            </>
          ) : null}
          {i.lastPaymentError && i.status === "open" ? (
            <>
              <dt className="text-ink-soft">Last attempt</dt>
              <dd className="text-red-700">{i.lastPaymentError}</dd>
            </>
          ) : null}
        </dl>
      </section>
      <section aria-label="Lines" className="rounded-xl border border-paper-line bg-white p-5 shadow-sm">
        <LinesTable
          lines={d.lines}
          currency={i.currency}
          footer={
            <tr>
              <th scope="row" colSpan={3} className="py-2 pr-3 text-right">
                Total
              </th>
              <td className="py-2 text-right font-mono font-semibold tabular-nums" data-testid="invoice-total">
                {money(i.totalMinor, i.currency)}
              </td>
            </tr>
          }
        />
      </section>
      <Caution />
      <TextLink href={withOrg("/billing")}>Back to billing</TextLink>
    </div>
  );
}
