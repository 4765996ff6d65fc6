/** The plan table: requests per second per key and compute units per organisation per calendar month (UTC). */
export const PLANS = {
  starter: { label: "Starter", requestsPerSecond: 10, monthlyUnits: 2_000_000 },
  team: { label: "Team", requestsPerSecond: 50, monthlyUnits: 50_000_000 },
  scale: { label: "Scale", requestsPerSecond: 200, monthlyUnits: 500_000_000 },
  dedicated: { label: "Dedicated", requestsPerSecond: 5000, monthlyUnits: 10_000_000_000 },
} as const;

export type PlanName = keyof typeof PLANS;
export const planOf = (name: string) => PLANS[(name in PLANS ? name : "starter") as PlanName];
