"use client";

import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { useEffect, useMemo, useState } from "react";
import type { UsageRow } from "@/lib/db/portal-usage";
import { USAGE_SORTS } from "@/lib/portal/schemas";
import { Caution } from "@/app/_components/caution";
import { portalFetch, PortalFetchError, withOrg } from "../../_components/fetch";
import { useMe } from "../../_components/me";
import { Empty, fmtDay, FormError, inputClass, Loading, PageHeader, quietButtonClass } from "../../_components/ui";
import { QuotaMeter, UsageChart, type MonthData } from "./usage-chart";

interface Table {
  from: string;
  to: string;
  page: number;
  pageSize: number;
  total: number;
  totals: { requests: number; units: number; errors: number };
  rows: UsageRow[];
  keys: { id: number; label: string; prefix: string | null }[];
  endpoints: string[];
}

type Sort = (typeof USAGE_SORTS)[number];
const COLUMNS: { key: Sort; label: string; numeric?: boolean }[] = [
  { key: "day", label: "Day (UTC)" },
  { key: "key", label: "Key" },
  { key: "endpoint", label: "Endpoint" },
  { key: "requests", label: "Requests", numeric: true },
  { key: "units", label: "Compute units", numeric: true },
  { key: "errors", label: "Errors", numeric: true },
  { key: "medianMs", label: "Median latency (ms)", numeric: true },
];

const n = (x: number) => x.toLocaleString("en-GB");
const plural = (x: number, word: string) => `${n(x)} ${word}${x === 1 ? "" : "s"}`;

export function UsageView() {
  const { me } = useMe();
  const search = useSearchParams();
  const router = useRouter();
  const path = usePathname();
  const today = new Date().toISOString().slice(0, 10);
  const monthAgo = new Date(Date.now() - 29 * 86_400_000).toISOString().slice(0, 10);
  // The filters, sort and page live in the address: a filtered view can be reloaded, bookmarked and shared.
  const filters = { from: search.get("from") ?? monthAgo, to: search.get("to") ?? today, keyId: search.get("keyId") ?? "", endpoint: search.get("endpoint") ?? "" };
  const sortParam = search.get("sort") as Sort | null;
  const sort: { by: Sort; dir: "asc" | "desc" } = { by: sortParam && USAGE_SORTS.includes(sortParam) ? sortParam : "day", dir: search.get("dir") === "asc" ? "asc" : "desc" };
  const page = Math.max(1, Number(search.get("page")) || 1);
  const [table, setTable] = useState<Table | null>(null);
  const [month, setMonth] = useState<MonthData | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [loading, setLoading] = useState(true);

  const query = useMemo(() => {
    const q = new URLSearchParams({ from: filters.from, to: filters.to, sort: sort.by, dir: sort.dir, page: String(page), pageSize: "25" });
    if (filters.keyId) q.set("keyId", filters.keyId);
    if (filters.endpoint) q.set("endpoint", filters.endpoint);
    return q.toString();
  }, [filters.from, filters.to, filters.keyId, filters.endpoint, sort.by, sort.dir, page]);

  useEffect(() => {
    setLoading(true);
    portalFetch<Table>(`/api/portal/usage?${query}`)
      .then((t) => (setTable(t), setError(null)))
      .catch((e: PortalFetchError) => (setError(e.problem?.error ?? "Usage could not be loaded."), setTable(null)))
      .finally(() => setLoading(false));
  }, [query]);

  useEffect(() => {
    portalFetch<MonthData>("/api/portal/usage/month").then(setMonth).catch(() => setMonth(null));
  }, []);

  const update = (changes: Record<string, string>) => {
    const next = new URLSearchParams(search.toString());
    for (const [k, v] of Object.entries(changes)) {
      if (v) next.set(k, v);
      else next.delete(k);
    }
    router.replace(`${path}?${next.toString()}`, { scroll: false });
  };
  const setFilter = (k: keyof typeof filters) => (v: string) => update({ [k]: v, page: "" });
  const sortBy = (by: Sort) => update({ sort: by, dir: sort.by === by && sort.dir === "desc" ? "asc" : "desc", page: "" });
  const setPage = (f: (p: number) => number) => update({ page: String(f(page)) });
  const pages = table ? Math.max(1, Math.ceil(table.total / table.pageSize)) : 1;
  const csvQuery = (() => {
    const q = new URLSearchParams(query);
    q.delete("page");
    q.delete("pageSize");
    return q.toString();
  })();

  return (
    <div className="space-y-6">
      <PageHeader
        title="Usage"
        lead={me?.role === "developer" ? "Calls made with the keys you created." : `Calls made with every key of ${me?.organization.name ?? "the organisation"}.`}
        actions={
          <a className={quietButtonClass} href={withOrg(`/api/portal/usage/csv?${csvQuery}`)} download>
            Download CSV
          </a>
        }
      />
      <Caution />
      {month ? <QuotaMeter data={month} /> : null}
      {month ? <UsageChart data={month} /> : null}
      <form aria-label="Usage filters" className="grid gap-3 rounded-xl border border-paper-line bg-white p-4 sm:grid-cols-4" onSubmit={(e) => e.preventDefault()}>
        <label className="text-sm font-semibold">
          From
          <input type="date" className={inputClass} value={filters.from} onChange={(e) => setFilter("from")(e.target.value)} />
        </label>
        <label className="text-sm font-semibold">
          To
          <input type="date" className={inputClass} value={filters.to} onChange={(e) => setFilter("to")(e.target.value)} />
        </label>
        <label className="text-sm font-semibold">
          Key
          <select className={inputClass} value={filters.keyId} onChange={(e) => setFilter("keyId")(e.target.value)}>
            <option value="">All keys</option>
            {table?.keys.map((k) => (
              <option key={k.id} value={k.id}>
                {k.label}{k.prefix ? ` (${k.prefix})` : ""}
              </option>
            ))}
          </select>
        </label>
        <label className="text-sm font-semibold">
          Endpoint
          <select className={inputClass} value={filters.endpoint} onChange={(e) => setFilter("endpoint")(e.target.value)}>
            <option value="">All endpoints</option>
            {table?.endpoints.map((ep) => <option key={ep} value={ep}>{ep}</option>)}
          </select>
        </label>
      </form>
      {error ? <FormError message={error} /> : !table ? <Loading label="Loading usage…" /> : table.rows.length === 0 ? (
        <Empty title="No calls in this period">Calls made with an API key appear here within a few seconds.</Empty>
      ) : (
        <div className="space-y-3">
          <p className="text-sm text-ink-soft" aria-live="polite">
            {loading ? "Updating… " : ""}
            {plural(table.totals.requests, "request")}, {plural(table.totals.units, "compute unit")}, {plural(table.totals.errors, "error")} from {fmtDay(table.from)} to {fmtDay(table.to)}.
          </p>
          <ul className="space-y-2 md:hidden" aria-label="Usage by day, key and endpoint">
            {table.rows.map((r) => (
              <li key={`${r.day}-${r.keyId}-${r.endpoint}`} className="rounded-lg border border-paper-line bg-white p-3 text-sm">
                <p className="flex flex-wrap justify-between gap-2">
                  <span className="font-semibold">{fmtDay(r.day)}</span>
                  <span className="font-mono text-xs">{r.endpoint}</span>
                </p>
                <p className="text-ink-soft">
                  {r.keyLabel ?? `#${r.keyId}`}
                  {r.keyPrefix ? <span className="ml-1 font-mono text-xs text-ink-faint">{r.keyPrefix}</span> : null}
                </p>
                <dl className="mt-1 grid grid-cols-2 gap-x-3 text-xs tabular-nums">
                  <dt className="text-ink-faint">Requests</dt><dd className="text-right">{n(r.requests)}</dd>
                  <dt className="text-ink-faint">Compute units</dt><dd className="text-right">{n(r.units)}</dd>
                  <dt className="text-ink-faint">Errors</dt><dd className={`text-right ${r.errors ? "font-semibold text-red-700" : ""}`}>{n(r.errors)}</dd>
                  <dt className="text-ink-faint">Median latency (ms)</dt><dd className="text-right">{n(r.medianMs)}</dd>
                </dl>
              </li>
            ))}
          </ul>
          <div className="relative hidden overflow-x-auto rounded-xl border border-paper-line bg-white md:block">
            <table className="w-full min-w-[48rem] text-left text-sm">
              <caption className="sr-only">Usage by day, key and endpoint</caption>
              <thead className="border-b border-paper-line bg-paper-warm text-xs uppercase tracking-wide text-ink-faint">
                <tr>
                  {COLUMNS.map((c) => (
                    <th key={c.key} scope="col" aria-sort={sort.by === c.key ? (sort.dir === "asc" ? "ascending" : "descending") : "none"} className={`px-4 py-2 ${c.numeric ? "text-right" : ""}`}>
                      <button type="button" className="inline-flex items-center gap-1 uppercase hover:text-fold-600" onClick={() => sortBy(c.key)}>
                        {c.label}
                        <span aria-hidden="true">{sort.by === c.key ? (sort.dir === "asc" ? "▲" : "▼") : ""}</span>
                      </button>
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {table.rows.map((r) => (
                  <tr key={`${r.day}-${r.keyId}-${r.endpoint}`} className="border-b border-paper-line last:border-0">
                    <td className="px-4 py-2 whitespace-nowrap">{fmtDay(r.day)}</td>
                    <td className="px-4 py-2">
                      {r.keyId === 0 ? "Explorer (portal)" : (r.keyLabel ?? `#${r.keyId}`)}
                      {r.keyPrefix ? <span className="block font-mono text-xs text-ink-faint">{r.keyPrefix}</span> : null}
                    </td>
                    <td className="px-4 py-2 font-mono text-xs">{r.endpoint}</td>
                    <td className="px-4 py-2 text-right tabular-nums">{n(r.requests)}</td>
                    <td className="px-4 py-2 text-right tabular-nums">{n(r.units)}</td>
                    <td className={`px-4 py-2 text-right tabular-nums ${r.errors ? "font-semibold text-red-700" : ""}`}>{n(r.errors)}</td>
                    <td className="px-4 py-2 text-right tabular-nums">{n(r.medianMs)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <nav aria-label="Pages" className="flex items-center justify-between text-sm">
            <button type="button" className={quietButtonClass} disabled={page <= 1} onClick={() => setPage((p) => p - 1)}>
              Previous
            </button>
            <span>
              Page {page} of {pages} · {plural(table.total, "row")}
            </span>
            <button type="button" className={quietButtonClass} disabled={page >= pages} onClick={() => setPage((p) => p + 1)}>
              Next
            </button>
          </nav>
        </div>
      )}
    </div>
  );
}
