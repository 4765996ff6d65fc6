"use client";

import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { useEffect, useState } from "react";
import type { AuditRow } from "@/lib/portal/audit";
import { portalFetch, PortalFetchError, withOrg } from "../../_components/fetch";
import { Empty, fmtDate, FormError, inputClass, Loading, PageHeader, quietButtonClass } from "../../_components/ui";

type Row = AuditRow;
interface Data {
  rows: Row[];
  truncated: boolean;
  facets: { actions: string[]; people: { id: number; name: string; email: string }[] };
}

const FILTERS = ["from", "to", "action", "actorUserId"] as const;
const detailText = (d: Record<string, unknown> | null) => (d ? Object.entries(d).map(([k, v]) => `${k}: ${typeof v === "string" ? v : JSON.stringify(v)}`).join(" · ") : "");

/** Who did what, when and from where; the filters live in the address, so a filtered view can be shared. */
export function AuditView() {
  const search = useSearchParams();
  const router = useRouter();
  const path = usePathname();
  const [data, setData] = useState<Data | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [fields, setFields] = useState<Record<string, string>>({});
  const query = new URLSearchParams(FILTERS.flatMap((k) => (search.get(k) ? [[k, search.get(k)!]] : []))).toString();

  useEffect(() => {
    setError(null);
    setFields({});
    portalFetch<Data>(`/api/portal/audit?${query}`)
      .then(setData)
      .catch((e: PortalFetchError) => {
        setError(e.problem?.error ?? "Could not load the audit log.");
        setFields(e.problem?.fields ?? {});
        setData(null);
      });
  }, [query]);

  function setFilter(k: (typeof FILTERS)[number], v: string) {
    const next = new URLSearchParams(search.toString());
    if (v) next.set(k, v);
    else next.delete(k);
    router.replace(`${path}?${next.toString()}`, { scroll: false });
  }

  const facets = data?.facets;
  return (
    <div className="space-y-6">
      <PageHeader
        title="Audit log"
        lead="Who did what in this organisation, when, and from which address. Times are UTC."
        actions={
          <a className={quietButtonClass} href={withOrg(`/api/portal/audit/csv?${query}`)} download>
            Download CSV
          </a>
        }
      />
      <form className="grid gap-3 rounded-xl border border-paper-line bg-white p-4 sm:grid-cols-2 lg:grid-cols-4" onSubmit={(e) => e.preventDefault()} aria-label="Filters">
        <label className="text-sm">
          <span className="font-semibold">From</span>
          <input type="date" className={inputClass} value={search.get("from") ?? ""} onChange={(e) => setFilter("from", e.target.value)} />
        </label>
        <label className="text-sm">
          <span className="font-semibold">To</span>
          <input type="date" className={inputClass} value={search.get("to") ?? ""} onChange={(e) => setFilter("to", e.target.value)} aria-invalid={fields.to ? true : undefined} />
        </label>
        <label className="text-sm">
          <span className="font-semibold">Action</span>
          <select className={inputClass} value={search.get("action") ?? ""} onChange={(e) => setFilter("action", e.target.value)}>
            <option value="">Every action</option>
            {[...new Set((facets?.actions ?? []).map((a) => a.split(".")[0]))].map((fam) => (
              <optgroup key={fam} label={fam}>
                <option value={fam}>every {fam} action</option>
                {facets!.actions.filter((a) => a.startsWith(`${fam}.`)).map((a) => (
                  <option key={a} value={a}>
                    {a}
                  </option>
                ))}
              </optgroup>
            ))}
          </select>
        </label>
        <label className="text-sm">
          <span className="font-semibold">Person</span>
          <select className={inputClass} value={search.get("actorUserId") ?? ""} onChange={(e) => setFilter("actorUserId", e.target.value)}>
            <option value="">Everyone</option>
            {(facets?.people ?? []).map((p) => (
              <option key={p.id} value={p.id}>
                {p.name} ({p.email})
              </option>
            ))}
          </select>
        </label>
      </form>
      <FormError message={error} />
      {!data && !error ? (
        <Loading />
      ) : data && data.rows.length === 0 ? (
        <Empty title="Nothing recorded for these filters" />
      ) : data ? (
        <>
          <ol className="space-y-2" aria-label="Audit events">
            {data.rows.map((r) => (
              <li key={r.id} className="grid gap-1 rounded-lg border border-paper-line bg-white px-4 py-3 text-sm md:grid-cols-[11rem_1fr_10rem]" data-action={r.action}>
                <time className="text-ink-faint tabular-nums" dateTime={r.at}>
                  {fmtDate(r.at)}
                </time>
                <div className="min-w-0">
                  <p className="break-words">
                    <span className="font-semibold">{r.who}</span>
                    {r.whoEmail ? <span className="text-ink-faint"> ({r.whoEmail})</span> : null} · <code className="rounded bg-paper-warm px-1 font-mono text-xs">{r.action}</code> · {r.target}
                  </p>
                  {r.detail ? <p className="break-words text-xs text-ink-soft">{detailText(r.detail)}</p> : null}
                </div>
                <p className="break-words text-xs text-ink-faint md:text-right" title={r.userAgent ?? undefined}>
                  {r.ip ? `from ${r.ip}` : "no address (command line or scheduled job)"}
                </p>
              </li>
            ))}
          </ol>
          {data.truncated ? <p className="text-sm text-ink-soft">Showing the newest {data.rows.length} events; narrow the filters or download the CSV for more.</p> : null}
        </>
      ) : null}
    </div>
  );
}
