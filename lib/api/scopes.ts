/** Endpoint groups a key can be granted, declared once. */
export const SCOPES = {
  cf: "Evaluate characteristic functions (POST /api/v1/cf)",
  distribution: "Densities, CDFs and quantiles (POST /api/v1/density, /api/v1/quantiles)",
  moments: "Moments and cumulants (POST /api/v1/moments)",
  lattice: "Convolution of tabulated lattice laws (POST /api/v1/convolve)",
  catalogue: "Read the family catalogue and the organisation's datasets (GET /api/v1/families, /api/v1/datasets)",
} as const;

export type Scope = keyof typeof SCOPES;
export const ALL_SCOPES = Object.keys(SCOPES) as Scope[];

export const isScope = (s: string): s is Scope => s in SCOPES;
