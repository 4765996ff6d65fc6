"use client";
// The billing page's two forms: the invoice details (name, address, tax id) and the billing contacts.
import { useState, type ReactNode } from "react";
import { portalFetch, PortalFetchError } from "../../_components/fetch";
import { buttonClass, dangerButtonClass, Field, FormError } from "../../_components/ui";

export function Section({ title, children, actions }: { title: string; children: ReactNode; actions?: ReactNode }) {
  return (
    <section aria-label={title} className="rounded-xl border border-paper-line bg-white p-5 shadow-sm">
      <div className="mb-3 flex flex-wrap items-center justify-between gap-3">
        <h2 className="font-display text-xl font-semibold">{title}</h2>
        {actions}
      </div>
      {children}
    </section>
  );
}

export function DetailsForm({ initial, onSaved }: { initial: { billingName: string; billingAddress: string; taxId: string }; onSaved: () => void }) {
  const [v, setV] = useState(initial);
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const save = async () => {
    try {
      await portalFetch("/api/portal/billing/details", { method: "PATCH", body: v });
      setFields({});
      setError(null);
      onSaved();
    } catch (e) {
      const p = (e as PortalFetchError).problem;
      setFields(p?.fields ?? {});
      setError(p?.error ?? "Not saved.");
    }
  };
  return (
    <Section title="Billing details">
      <form
        className="space-y-3"
        onSubmit={(e) => {
          e.preventDefault();
          void save();
        }}
      >
        <FormError message={error} />
        <Field label="Name on invoices" name="billingName" value={v.billingName} onChange={(x) => setV({ ...v, billingName: x })} error={fields.billingName} required />
        <Field label="Address" name="billingAddress" value={v.billingAddress} onChange={(x) => setV({ ...v, billingAddress: x })} error={fields.billingAddress} hint="One line; commas separate the lines on the PDF." />
        <Field label="Tax id" name="taxId" value={v.taxId} onChange={(x) => setV({ ...v, taxId: x })} error={fields.taxId} />
        <button type="submit" className={buttonClass}>
          Save details
        </button>
      </form>
    </Section>
  );
}

export function Contacts({ initial }: { initial: { id: number; email: string; name: string }[] }) {
  const [list, setList] = useState(initial);
  const [v, setV] = useState({ name: "", email: "" });
  const [fields, setFields] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const add = async () => {
    try {
      const out = await portalFetch<{ contacts: typeof list }>("/api/portal/billing/contacts", { body: v });
      setList(out.contacts);
      setV({ name: "", email: "" });
      setFields({});
      setError(null);
    } catch (e) {
      const p = (e as PortalFetchError).problem;
      setFields(p?.fields ?? {});
      setError(p?.error ?? "Not added.");
    }
  };
  const remove = async (id: number) => {
    try {
      await portalFetch(`/api/portal/billing/contacts/${id}`, { method: "DELETE" });
      setList(list.filter((c) => c.id !== id));
    } catch (e) {
      setError((e as PortalFetchError).problem?.error ?? "Not removed.");
    }
  };
  return (
    <Section title="Billing contacts">
      <p className="mb-3 text-sm text-ink-soft">Receipts, failed-payment notices and plan changes go to these addresses and to members with the billing role.</p>
      <FormError message={error} />
      {list.length > 0 ? (
        <ul className="mb-4 divide-y divide-paper-line">
          {list.map((c) => (
            <li key={c.id} className="flex items-center justify-between gap-3 py-2">
              <span>
                <span className="font-semibold">{c.name}</span> <span className="text-ink-soft">{c.email}</span>
              </span>
              <button type="button" className={dangerButtonClass} onClick={() => void remove(c.id)}>
                Remove<span className="sr-only"> {c.email}</span>
              </button>
            </li>
          ))}
        </ul>
      ) : null}
      <form
        className="grid gap-3 sm:grid-cols-[1fr_1fr_auto] sm:items-end"
        onSubmit={(e) => {
          e.preventDefault();
          void add();
        }}
      >
        <Field label="Contact name" name="name" value={v.name} onChange={(x) => setV({ ...v, name: x })} error={fields.name} required />
        <Field label="Contact e-mail" name="email" type="email" value={v.email} onChange={(x) => setV({ ...v, email: x })} error={fields.email} required />
        <button type="submit" className={buttonClass}>
          Add contact
        </button>
      </form>
    </Section>
  );
}
