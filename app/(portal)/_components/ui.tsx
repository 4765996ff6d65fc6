"use client";

import Link from "next/link";
import { useId, type ReactNode } from "react";

export const inputClass =
  "mt-1 block w-full rounded-md border border-paper-line bg-white px-3 py-2 text-ink shadow-sm focus:border-fold-500 aria-[invalid=true]:border-red-600";
export const buttonClass =
  "inline-flex items-center justify-center gap-2 rounded-md bg-fold-600 px-4 py-2 text-sm font-semibold text-white hover:bg-fold-700 disabled:cursor-not-allowed disabled:opacity-60";
export const quietButtonClass =
  "inline-flex items-center justify-center gap-2 rounded-md border border-paper-line bg-white px-3 py-1.5 text-sm font-semibold text-ink hover:border-fold-500 disabled:opacity-60";
export const dangerButtonClass =
  "inline-flex items-center justify-center gap-2 rounded-md border border-red-300 bg-white px-3 py-1.5 text-sm font-semibold text-red-700 hover:bg-red-50 disabled:opacity-60";

/** A labelled field whose error and hint are tied to the control by aria-describedby. */
export function Field(props: {
  label: string;
  name: string;
  type?: string;
  value: string;
  onChange: (v: string) => void;
  error?: string;
  hint?: string;
  autoComplete?: string;
  required?: boolean;
  min?: string;
}) {
  const id = useId();
  const errId = `${id}-err`;
  const hintId = `${id}-hint`;
  const described = [props.hint ? hintId : "", props.error ? errId : ""].filter(Boolean).join(" ") || undefined;
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-semibold text-ink">
        {props.label}
      </label>
      <input
        id={id}
        name={props.name}
        type={props.type ?? "text"}
        value={props.value}
        onChange={(e) => props.onChange(e.target.value)}
        autoComplete={props.autoComplete}
        required={props.required}
        min={props.min}
        aria-invalid={props.error ? true : undefined}
        aria-describedby={described}
        className={inputClass}
      />
      {props.hint ? (
        <p id={hintId} className="mt-1 text-xs text-ink-faint">
          {props.hint}
        </p>
      ) : null}
      {props.error ? (
        <p id={errId} className="mt-1 text-sm text-red-700">
          {props.error}
        </p>
      ) : null}
    </div>
  );
}

export function FormError({ message }: { message?: string | null }) {
  if (!message) return null;
  return (
    <p role="alert" className="rounded-md border border-red-300 bg-red-50 px-3 py-2 text-sm text-red-800">
      {message}
    </p>
  );
}

export function Notice({ children, tone = "info" }: { children: ReactNode; tone?: "info" | "success" }) {
  return (
    <div role="status" className={`rounded-md border px-3 py-2 text-sm ${tone === "success" ? "border-fold-500/40 bg-fold-50 text-fold-900" : "border-paper-line bg-paper-warm text-ink-soft"}`}>
      {children}
    </div>
  );
}

export function AuthCard({ title, children, footer }: { title: string; children: ReactNode; footer?: ReactNode }) {
  return (
    <section className="mx-auto w-full max-w-md px-5 py-12">
      <div className="rounded-xl border border-paper-line bg-white p-6 shadow-sm sm:p-8">
        <h1 className="font-display text-2xl font-semibold">{title}</h1>
        <div className="mt-5 space-y-4">{children}</div>
      </div>
      {footer ? <div className="mt-4 text-center text-sm text-ink-soft">{footer}</div> : null}
    </section>
  );
}

export function Loading({ label = "Loading…" }: { label?: string }) {
  return (
    <p role="status" aria-live="polite" className="animate-pulse py-6 text-sm text-ink-faint">
      {label}
    </p>
  );
}

export function Empty({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-paper-line bg-paper-warm px-6 py-10 text-center">
      <p className="font-semibold text-ink">{title}</p>
      {children ? <div className="mt-2 text-sm text-ink-soft">{children}</div> : null}
    </div>
  );
}

export function PageHeader({ title, lead, actions }: { title: string; lead?: ReactNode; actions?: ReactNode }) {
  return (
    <div className="flex flex-wrap items-end justify-between gap-4">
      <div>
        <h1 className="font-display text-3xl font-semibold">{title}</h1>
        {lead ? <p className="mt-1 max-w-2xl text-ink-soft">{lead}</p> : null}
      </div>
      {actions}
    </div>
  );
}

export const TextLink = ({ href, children }: { href: string; children: ReactNode }) => (
  <Link href={href} className="font-semibold text-fold-600 underline-offset-2 hover:underline">
    {children}
  </Link>
);

export const fmtDate = (iso: string | null) =>
  iso ? new Date(iso).toLocaleString("en-GB", { dateStyle: "medium", timeStyle: "short", timeZone: "UTC" }) + " UTC" : "—";
export const fmtDay = (iso: string) => new Date(`${iso.slice(0, 10)}T00:00:00Z`).toLocaleDateString("en-GB", { dateStyle: "medium", timeZone: "UTC" });

/** Shown on narrow screens above a table that scrolls sideways (its last column, the actions, stays in view). */
export function ScrollHint() {
  return (
    <p className="mt-2 text-xs text-ink-faint md:hidden" aria-hidden="true">
      Scroll the table sideways for more columns →
    </p>
  );
}
