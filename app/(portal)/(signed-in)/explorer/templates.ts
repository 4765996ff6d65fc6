import { aggregateClaimsModel, stableReturnModel, toleranceStackModel } from "@/lib/demo/scenario";

/** The explorer's starting points, from the demo scenario (invented companies and figures). */
export const TEMPLATES = [
  {
    id: "claims",
    title: "Aggregate claims",
    blurb: "Harrowgate Mutual's hail book: Poisson(42) claims, each gamma(1.8, 0.12), EUR thousands.",
    model: aggregateClaimsModel,
    p: "0.5, 0.9, 0.99, 0.995",
  },
  {
    id: "stack",
    title: "Tolerance stack",
    blurb: "Kestrel's gearbox housing: two machined (normal) and three cast (uniform) lengths, mm.",
    model: toleranceStackModel,
    p: "0.00135, 0.5, 0.99865",
  },
  {
    id: "stable",
    title: "Stable law",
    blurb: "A currency basket's daily return (%): alpha 1.7, skewed to losses.",
    model: stableReturnModel,
    p: "0.01, 0.05, 0.5, 0.95",
  },
] as const;
