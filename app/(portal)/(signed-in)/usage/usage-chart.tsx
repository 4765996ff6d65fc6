"use client";

import { Bar, BarChart, CartesianGrid, Legend, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";

export interface MonthData {
  month: string;
  plan: string;
  quota: number;
  /** units the plan's fee includes (below the cap, quota) */
  included?: number;
  organizationUnits: number;
  days: { day: string; units: number; cumulative: number }[];
  scope: "own" | "organization";
}

const compact = (n: number) => new Intl.NumberFormat("en-GB", { notation: "compact", maximumFractionDigits: 1 }).format(n);

/** A share of the quota in words that never reads 0.0% while something was used. */
export function percentOf(used: number, quota: number): string {
  if (quota <= 0) return "—";
  const p = (100 * used) / quota;
  if (used > 0 && p < 0.1) return "under 0.1%";
  return `${p < 10 ? p.toFixed(1) : Math.round(p)}%`;
}

/** The month's use of the quota as its own bar: one scale, the organisation's units against its quota. */
export function QuotaMeter({ data }: { data: MonthData }) {
  const share = data.quota > 0 ? Math.min(1, data.organizationUnits / data.quota) : 0;
  return (
    <section aria-labelledby="quota-h" className="rounded-xl border border-paper-line bg-white p-4">
      <h2 id="quota-h" className="font-display text-lg font-semibold">Monthly quota, {data.month}</h2>
      <p className="mt-1 text-sm text-ink-soft">
        The organisation has used <strong className="text-ink">{data.organizationUnits.toLocaleString("en-GB")}</strong> of{" "}
        {data.quota.toLocaleString("en-GB")} compute units, the plan&rsquo;s monthly cap ({percentOf(data.organizationUnits, data.quota)}, {data.plan} plan).
        {data.included !== undefined && data.included < data.quota ? ` The fee includes ${data.included.toLocaleString("en-GB")} of them; units past those are billed per extra million (see Billing).` : ""} Units renew on
        the first of the month (UTC).
      </p>
      <div
        className="mt-3 h-3 w-full overflow-hidden rounded-full bg-paper-warm ring-1 ring-paper-line"
        role="progressbar"
        aria-label="Share of the monthly quota used"
        aria-valuemin={0}
        aria-valuemax={data.quota}
        aria-valuenow={data.organizationUnits}
        aria-valuetext={`${data.organizationUnits} of ${data.quota} units (${percentOf(data.organizationUnits, data.quota)})`}
      >
        {/* at least a sliver when anything was used, so a small share is seen as non-zero */}
        <div className={`h-full ${share >= 0.9 ? "bg-red-600" : share >= 0.75 ? "bg-amber-500" : "bg-fold-600"}`} style={{ width: `${share > 0 ? Math.max(share * 100, 0.8) : 0}%` }} />
      </div>
    </section>
  );
}

/** Units per day of the month, on one axis (the quota is shown on its own, above). */
export function UsageChart({ data }: { data: MonthData }) {
  const rows = data.days.map((d) => ({ ...d, label: d.day.slice(8) }));
  const name = data.scope === "own" ? "Your keys' units per day" : "Organisation's units per day";
  return (
    <figure className="min-w-0 rounded-xl border border-paper-line bg-white p-4">
      <figcaption className="mb-2 font-display text-lg font-semibold">Compute units per day, {data.month}</figcaption>
      <div className="h-64 w-full" role="img" aria-label={`${name} in ${data.month}`}>
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={rows} margin={{ top: 8, right: 8, bottom: 0, left: 0 }}>
            <CartesianGrid stroke="#e2ddd0" vertical={false} />
            <XAxis dataKey="label" tick={{ fontSize: 11 }} interval="preserveStartEnd" minTickGap={8} />
            <YAxis allowDecimals={false} tickFormatter={compact} tick={{ fontSize: 11 }} width={44} />
            <Tooltip formatter={(v) => [Number(v).toLocaleString("en-GB"), "units"]} labelFormatter={(l) => `${data.month}-${l}`} />
            <Legend verticalAlign="top" align="left" height={28} wrapperStyle={{ fontSize: 12, color: "#17202e" }} />
            <Bar dataKey="units" name={name} fill="#1b8a7a" isAnimationActive={false} />
          </BarChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}
