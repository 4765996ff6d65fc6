import { aggregateClaimsModel, stableReturnModel, toleranceStackModel } from "@/lib/demo/scenario";

/** The explorer's starting points, from the demo scenario (invented companies and figures). */
export const TEMPLATES = [
  {
    id: "claims",
    title: "Aggregate claims",
    blurb: "Harrowgate Mutual's hail book: Poisson(42) claims, each gamma(1.8, 0.12), EUR thousands.",
    model: aggregateClaimsModel,
    p: "0.5, 0.9, 0.99, 0.995",
    // risk panel: the reinsurer's view (upper tail, stop-loss retentions above the mean 42 x 15 = 630)
    risk: { tail: "upper", levels: "0.99, 0.995", retentions: "700, 800", spec: "" },
  },
  {
    id: "stack",
    title: "Tolerance stack",
    blurb: "Kestrel's gearbox housing: two machined (normal) and three cast (uniform) lengths, mm.",
    model: toleranceStackModel,
    p: "0.00135, 0.5, 0.99865",
    // the housing's drawing: 77.5 +- 0.12 mm, so parts per million outside show at once
    risk: { tail: "upper", levels: "0.99865", retentions: "", spec: "77.38, 77.62" },
  },
  {
    id: "stable",
    title: "Stable law",
    blurb: "A currency basket's daily return (%): alpha 1.7, skewed to losses.",
    model: stableReturnModel,
    p: "0.01, 0.05, 0.5, 0.95",
    // the loss tail of a return: lower-tail VaR and ES
    risk: { tail: "lower", levels: "0.01, 0.05", retentions: "", spec: "" },
  },
] as const;
