/**
 * The plan table: requests per second per key, compute units per organisation per calendar month (UTC), the
 * deadline of one synchronous computation, how many computations one key may have running at once (per server
 * instance), and the deadline of one queued job.
 */
export const PLANS = {
  starter: { label: "Starter", requestsPerSecond: 10, monthlyUnits: 2_000_000, computeBudgetMs: 2_000, concurrentComputations: 2, jobBudgetMs: 60_000 },
  team: { label: "Team", requestsPerSecond: 50, monthlyUnits: 50_000_000, computeBudgetMs: 4_000, concurrentComputations: 4, jobBudgetMs: 120_000 },
  scale: { label: "Scale", requestsPerSecond: 200, monthlyUnits: 500_000_000, computeBudgetMs: 6_000, concurrentComputations: 8, jobBudgetMs: 300_000 },
  dedicated: { label: "Dedicated", requestsPerSecond: 5000, monthlyUnits: 10_000_000_000, computeBudgetMs: 10_000, concurrentComputations: 16, jobBudgetMs: 600_000 },
} as const;

export type PlanName = keyof typeof PLANS;
export const planOf = (name: string) => PLANS[(name in PLANS ? name : "starter") as PlanName];
