"use client";

import { CartesianGrid, ComposedChart, Legend, Line, ReferenceDot, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";

export interface DensityResult {
  x: number[];
  pdf?: number[];
  pmf?: number[];
  cdf: number[];
  atoms: { x: number; p: number }[];
}

const MAX_POINTS = 600;
const fmt = (v: number) => (Math.abs(v) >= 1e4 || (Math.abs(v) < 1e-3 && v !== 0) ? v.toExponential(2) : Number(v.toPrecision(4)).toString());

/** pdf (or pmf) on the left axis, cdf on the right; atoms marked with a dot at their probability. */
export function ResultChart({ data }: { data: DensityResult }) {
  const dens = data.pdf ?? data.pmf ?? [];
  const stride = Math.max(1, Math.ceil(data.x.length / MAX_POINTS));
  const rows: { x: number; density: number; cdf: number }[] = [];
  for (let i = 0; i < data.x.length; i += stride) rows.push({ x: data.x[i], density: dens[i], cdf: data.cdf[i] });
  const label = data.pdf ? "pdf" : "pmf";
  return (
    <figure className="rounded-xl border border-paper-line bg-white p-4">
      <figcaption className="mb-2 font-display text-lg font-semibold">
        Density and distribution function{data.atoms.length ? ` · ${data.atoms.length} atom${data.atoms.length > 1 ? "s" : ""} marked` : ""}
      </figcaption>
      <div className="h-80 w-full" role="img" aria-label={`${label} and cdf of the model over [${fmt(data.x[0])}, ${fmt(data.x[data.x.length - 1])}]`}>
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={rows} margin={{ top: 10, right: 16, bottom: 4, left: 8 }}>
            <CartesianGrid stroke="#e2ddd0" />
            <XAxis dataKey="x" type="number" domain={["dataMin", "dataMax"]} tickFormatter={fmt} tick={{ fontSize: 11 }} />
            <YAxis yAxisId="d" domain={[0, "auto"]} allowDataOverflow tickFormatter={fmt} tick={{ fontSize: 11 }} width={56} />
            <YAxis yAxisId="c" orientation="right" domain={[0, 1]} ticks={[0, 0.25, 0.5, 0.75, 1]} allowDataOverflow tickFormatter={(v: number) => v.toFixed(2)} tick={{ fontSize: 11 }} width={44} />
            <Tooltip formatter={(v) => fmt(Number(v))} labelFormatter={(l) => `x = ${fmt(Number(l))}`} />
            <Legend wrapperStyle={{ fontSize: 12 }} />
            <Line yAxisId="d" dataKey="density" name={label} stroke="#1b8a7a" dot={false} strokeWidth={2} isAnimationActive={false} />
            <Line yAxisId="c" dataKey="cdf" name="cdf" stroke="#17202e" dot={false} strokeDasharray="5 3" isAnimationActive={false} />
            {data.atoms.map((a) => (
              <ReferenceDot key={a.x} yAxisId="c" x={a.x} y={Math.min(1, a.p)} r={5} fill="#b7791f" stroke="#8a5a12" label={{ value: `atom ${fmt(a.p)}`, position: "top", fontSize: 11 }} />
            ))}
          </ComposedChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}
