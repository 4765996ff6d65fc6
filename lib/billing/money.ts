// Billing arithmetic: periods, proration and invoice lines, in integer minor units (no floats touch money).
import { CURRENCY, formatMoney, isPlanName, PLANS, type PlanName } from "@/lib/api/plans";

/** Billing periods are calendar months in UTC, the same months the monthly quota counts. */
export function periodOf(d: Date): { start: Date; end: Date } {
  return { start: new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1)), end: new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1)) };
}

/** a * num / den rounded half up, exactly (BigInt), for non-negative num and positive den. */
export function mulDivRound(a: number, num: number, den: number): number {
  if (den <= 0) throw new RangeError("den must be positive");
  const sign = a < 0 ? -1n : 1n;
  const A = BigInt(Math.abs(a)) * BigInt(num);
  const D = BigInt(den);
  return Number((sign * ((2n * A + D) / (2n * D))));
}

/**
 * What an upgrade costs at once: the fee difference for the part of the period left, to the millisecond, rounded
 * half up to a whole minor unit (common practice for time-based proration).
 */
export function prorationMinor(from: PlanName, to: PlanName, at: Date, period: { start: Date; end: Date }): number {
  const diff = PLANS[to].monthlyFeeMinor - PLANS[from].monthlyFeeMinor;
  const left = Math.max(0, period.end.getTime() - at.getTime());
  const length = period.end.getTime() - period.start.getTime();
  return diff <= 0 ? 0 : mulDivRound(diff, left, length);
}

export interface Line {
  description: string;
  quantity: number;
  unitLabel: string;
  amountMinor: number;
}

const units = (n: number) => n.toLocaleString("en-GB");
const day = (d: Date) => d.toLocaleDateString("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: "UTC" });
/** "1 Nov 2026 – 30 Nov 2026" for the period [start, end). */
export const periodLabel = (p: { start: Date; end: Date }) => `${day(p.start)} – ${day(new Date(p.end.getTime() - 1))}`;

/**
 * A closed period's lines: the fee of the plan held when the period began (an upgrade inside the period was
 * charged at once, prorated), then every metered unit: those the subscribed plan includes, and the rest at its
 * price per million. The quantities add up to `metered` exactly.
 */
export function periodLines(p: { feePlan: string; usagePlan: string; metered: number; period: { start: Date; end: Date } }): Line[] {
  const fee = PLANS[isPlanName(p.feePlan) ? p.feePlan : "free"];
  const usage = PLANS[isPlanName(p.usagePlan) ? p.usagePlan : "free"];
  const included = Math.min(p.metered, usage.includedUnits);
  const extra = p.metered - included;
  return [
    { description: `${fee.label} plan, ${periodLabel(p.period)}`, quantity: 1, unitLabel: formatMoney(fee.monthlyFeeMinor), amountMinor: fee.monthlyFeeMinor },
    { description: `Compute units included in the ${usage.label} plan (${units(usage.includedUnits)} a month)`, quantity: included, unitLabel: "included", amountMinor: 0 },
    {
      description: `Compute units beyond the included ${units(usage.includedUnits)}`,
      quantity: extra,
      unitLabel: `${formatMoney(usage.overagePerMillionMinor)} per million`,
      amountMinor: mulDivRound(usage.overagePerMillionMinor, extra, 1_000_000),
    },
  ];
}

export const linesTotal = (lines: Line[]) => lines.reduce((s, l) => s + l.amountMinor, 0);
export { CURRENCY };
