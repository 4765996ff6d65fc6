/** Hard limits of the numerical core; the API maps breaches to CfError("limit_exceeded"). */
export const MAX_GRID_POINTS = 2 ** 20;
export const MAX_MODEL_NODES = 256;
export const MAX_DEPTH = 32;
export const MAX_REPEAT = 1e6;
export const MAX_SAMPLE = 1e6;
export const MAX_LATTICE = 2 ** 20;
export const MAX_MOMENT_ORDER = 12;
