/**
 * The plan catalogue, the one place plans are defined: the limiter, the quota, billing, the docs and the portal
 * read it, and start-up copies it into the `plans` table (so invoices and reports can join on it).
 *
 * Money is in integer minor units of `CURRENCY` (pence), never floats. `monthlyUnits` is the hard monthly cap the
 * limiter enforces; `includedUnits` are covered by the fee and each further million costs `overagePerMillionMinor`
 * (pro rata to the unit, rounded half up to a whole minor unit once per invoice). The engine limits: the deadline of
 * one synchronous computation, how many computations one key may have running at once (across server instances), and
 * the deadline of one queued job.
 */
export const CURRENCY = "GBP" as const;

export const PLANS = {
  free: {
    label: "Free",
    rank: 0,
    monthlyFeeMinor: 0,
    includedUnits: 200_000,
    overagePerMillionMinor: 0,
    requestsPerSecond: 5,
    monthlyUnits: 200_000,
    computeBudgetMs: 1_000,
    concurrentComputations: 1,
    jobBudgetMs: 30_000,
  },
  starter: {
    label: "Starter",
    rank: 1,
    monthlyFeeMinor: 4_900,
    includedUnits: 1_000_000,
    overagePerMillionMinor: 400,
    requestsPerSecond: 10,
    monthlyUnits: 2_000_000,
    computeBudgetMs: 2_000,
    concurrentComputations: 2,
    jobBudgetMs: 60_000,
  },
  team: {
    label: "Team",
    rank: 2,
    monthlyFeeMinor: 39_000,
    includedUnits: 25_000_000,
    overagePerMillionMinor: 300,
    requestsPerSecond: 50,
    monthlyUnits: 50_000_000,
    computeBudgetMs: 4_000,
    concurrentComputations: 4,
    jobBudgetMs: 120_000,
  },
  scale: {
    label: "Scale",
    rank: 3,
    monthlyFeeMinor: 240_000,
    includedUnits: 250_000_000,
    overagePerMillionMinor: 200,
    requestsPerSecond: 200,
    monthlyUnits: 500_000_000,
    computeBudgetMs: 6_000,
    concurrentComputations: 8,
    jobBudgetMs: 300_000,
  },
  dedicated: {
    label: "Dedicated",
    rank: 4,
    monthlyFeeMinor: 1_200_000,
    includedUnits: 5_000_000_000,
    overagePerMillionMinor: 100,
    requestsPerSecond: 5000,
    monthlyUnits: 10_000_000_000,
    computeBudgetMs: 10_000,
    concurrentComputations: 16,
    jobBudgetMs: 600_000,
  },
} as const;

export type PlanName = keyof typeof PLANS;
export type Plan = (typeof PLANS)[PlanName];

/** The plan new organisations start on, and the limits an organisation falls back to when its payment lapses. */
export const FREE_PLAN: PlanName = "free";

export const PLAN_NAMES = Object.keys(PLANS) as PlanName[];
export const isPlanName = (name: string): name is PlanName => Object.hasOwn(PLANS, name);
export const planOf = (name: string) => PLANS[isPlanName(name) ? name : "starter"];

/** Formats an amount in minor units, e.g. 39000 -> "£390.00". */
export function formatMoney(minor: number, currency: string = CURRENCY): string {
  return new Intl.NumberFormat("en-GB", { style: "currency", currency }).format(minor / 100);
}
