"use client";

import { Bar, CartesianGrid, ComposedChart, Legend, Line, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";

export interface MonthData {
  month: string;
  plan: string;
  quota: number;
  organizationUnits: number;
  days: { day: string; units: number; cumulative: number }[];
  scope: "own" | "organization";
}

const compact = (n: number) => new Intl.NumberFormat("en-GB", { notation: "compact", maximumFractionDigits: 1 }).format(n);

/** Daily units (bars) and the running total (line) of the month against the plan's monthly quota. */
export function UsageChart({ data }: { data: MonthData }) {
  const rows = data.days.map((d) => ({ ...d, label: d.day.slice(8) }));
  const top = Math.max(data.quota * 1.05, ...rows.map((r) => r.cumulative));
  return (
    <figure className="rounded-xl border border-paper-line bg-white p-4">
      <figcaption className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
        <span className="font-display text-lg font-semibold">Compute units in {data.month}</span>
        <span className="text-sm text-ink-soft">
          Organisation: {data.organizationUnits.toLocaleString("en-GB")} of {data.quota.toLocaleString("en-GB")} ({data.plan} plan,{" "}
          {((100 * data.organizationUnits) / data.quota).toFixed(1)}%)
        </span>
      </figcaption>
      <div className="h-72 w-full" role="img" aria-label={`Daily compute units in ${data.month} and their running total against the monthly quota of ${data.quota} units`}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={rows} margin={{ top: 10, right: 16, bottom: 0, left: 8 }}>
            <CartesianGrid stroke="#e2ddd0" vertical={false} />
            <XAxis dataKey="label" tick={{ fontSize: 11 }} interval={2} />
            <YAxis yAxisId="daily" allowDecimals={false} tickFormatter={compact} tick={{ fontSize: 11 }} width={48} />
            <YAxis yAxisId="total" orientation="right" domain={[0, top]} tickFormatter={compact} tick={{ fontSize: 11 }} width={56} />
            <Tooltip formatter={(v) => Number(v).toLocaleString("en-GB")} labelFormatter={(l) => `${data.month}-${l}`} />
            <Legend wrapperStyle={{ fontSize: 12 }} />
            <Bar yAxisId="daily" dataKey="units" name={data.scope === "own" ? "Your units per day" : "Units per day"} fill="#1b8a7a" isAnimationActive={false} />
            <Line yAxisId="total" dataKey="cumulative" name="Running total" stroke="#17202e" dot={false} strokeWidth={2} isAnimationActive={false} />
            <ReferenceLine yAxisId="total" y={data.quota} stroke="#b7791f" strokeDasharray="6 4" label={{ value: "Monthly quota", position: "insideTopRight", fill: "#8a5a12", fontSize: 12 }} />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}
