// The demo scenario: invented organisations, people and models. Used by the seed, the docs' examples and
// the explorer's templates. None of these companies or figures exist.

export const DEMO_PASSWORD = "sumfold-demo-2026";

export const demoOrganizations = [
  { slug: "harrowgate-mutual", name: "Harrowgate Mutual", plan: "team" },
  { slug: "kestrel-precision", name: "Kestrel Precision Works", plan: "starter" },
] as const;

/**
 * Billing of the demo organisations: their details, extra billing contacts, and the compute units they used last
 * month (spread over its days), which the first period close turns into last month's invoice.
 */
export const demoBilling = [
  {
    org: "harrowgate-mutual",
    billingName: "Harrowgate Mutual Insurance Society",
    billingAddress: "14 Cloth Hall Street, Harrowgate HG1 4QT, United Kingdom",
    taxId: "GB 204 7781 36",
    contacts: [{ email: "accounts@harrowgate.example", name: "Harrowgate accounts payable" }],
    lastMonthUnits: 31_420_750,
  },
  {
    org: "kestrel-precision",
    billingName: "Kestrel Precision Works Ltd",
    billingAddress: "Unit 7, Mill Race Estate, Kestrel Bridge KB3 9LP, United Kingdom",
    taxId: "",
    contacts: [],
    lastMonthUnits: 1_318_400,
  },
] as const;

export const demoPeople = [
  { email: "ada.okafor@harrowgate.example", name: "Ada Okafor", memberships: [["harrowgate-mutual", "admin"]] },
  { email: "tomas.lind@harrowgate.example", name: "Tomas Lind", memberships: [["harrowgate-mutual", "developer"]] },
  { email: "priya.menon@harrowgate.example", name: "Priya Menon", memberships: [["harrowgate-mutual", "billing"]] },
  {
    email: "wen.castillo@kestrel.example",
    name: "Wen Castillo",
    memberships: [
      ["kestrel-precision", "admin"],
      ["harrowgate-mutual", "developer"],
    ],
  },
] as const;

/** Harrowgate's 2027 hail-damage book: a Poisson number of claims, each gamma-distributed (in EUR thousands). */
export const aggregateClaimsModel = {
  compound: {
    count: { family: "poisson", lambda: 42 },
    each: { family: "gamma", shape: 1.8, rate: 0.12 },
  },
} as const;

/** Kestrel's gearbox housing: five stacked parts (mm), two machined (normal) and three cast (uniform). */
export const toleranceStackModel = {
  sum: [
    { family: "normal", mu: 12.0, sigma: 0.012 },
    { family: "normal", mu: 8.5, sigma: 0.01 },
    { family: "uniform", a: 20.97, b: 21.03 },
    { family: "uniform", a: 4.98, b: 5.02 },
    { family: "uniform", a: 30.95, b: 31.05 },
  ],
} as const;

/** Daily log-return (%) of Harrowgate's invented currency basket, modelled as a stable law. */
export const stableReturnModel = {
  family: "stable",
  alpha: 1.7,
  beta: -0.2,
  scale: 0.45,
  loc: 0.02,
  param: "S0",
} as const;

/**
 * Harrowgate's property per-risk excess-of-loss programme (invented): ground-up claims are lomax (alpha 2.4,
 * theta 60, EUR thousands), a Poisson(42) number a year; the first layer pays 250 xs 100 of each claim.
 */
export const harrowgateGroundUp = { family: "lomax", alpha: 2.4, theta: 60 } as const;
export const reinsuranceLayerModel = {
  compound: {
    count: { family: "poisson", lambda: 42 },
    each: { layer: { deductible: 100, limit: 250 }, of: harrowgateGroundUp },
  },
} as const;

/** Kestrel's pump shaft stack (invented, mm): a machined part (normal), two cast parts (triangular) and a bought-in seal (PERT). */
export const kestrelShaftStack = {
  sum: [
    { family: "normal", mu: 40.0, sigma: 0.015 },
    { family: "triangular", a: 12.94, c: 13.0, b: 13.08 },
    { family: "triangular", a: 7.96, c: 8.0, b: 8.03 },
    { family: "pert", a: 2.97, m: 3.0, b: 3.05 },
  ],
} as const;

export const demoModels = [
  {
    org: "harrowgate-mutual",
    name: "Hail damage 2027 — aggregate claims",
    description: "Poisson(42) claim count, gamma(1.8, 0.12) claim size in EUR thousands.",
    model: aggregateClaimsModel,
  },
  {
    org: "harrowgate-mutual",
    name: "Currency basket — daily return",
    description: "Stable law, alpha 1.7, skewed to losses (S0 parameterisation), in percent.",
    model: stableReturnModel,
  },
  {
    org: "harrowgate-mutual",
    name: "Property per-risk XL — first layer 250 xs 100",
    description: "Poisson(42) claims a year, lomax(2.4, 60) ground-up in EUR thousands, each claim's 250 xs 100 layer.",
    model: reinsuranceLayerModel,
  },
  {
    org: "kestrel-precision",
    name: "Pump shaft — length stack",
    description: "A machined part (normal), two cast parts (triangular) and a bought-in seal (PERT), lengths in mm.",
    model: kestrelShaftStack,
  },
  {
    org: "kestrel-precision",
    name: "Gearbox housing — length stack",
    description: "Two machined parts (normal) and three cast parts (uniform), lengths in mm.",
    model: toleranceStackModel,
  },
] as const;
