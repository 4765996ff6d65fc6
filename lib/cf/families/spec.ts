/**
 * Parameter table of every named family: one source for the zod schemas, the validator, the compiler and the
 * catalogue. Adding a family is its name in FAMILY_NAMES (spec-types.ts), one entry in the part file of its kind and
 * its module.
 */
import type { FamilyName, FamilySpec } from "./spec-types";
import { CONTINUOUS_SPECS } from "./spec-continuous";
import { COUNT_SPECS } from "./spec-counts";
import { SEVERITY_SPECS } from "./spec-severities";

export { FAMILY_NAMES, type FamilyName, type FamilyParams, type FamilySpec, type ParamSpec, type Params } from "./spec-types";

export const FAMILY_SPECS: Record<FamilyName, FamilySpec> = { ...CONTINUOUS_SPECS, ...COUNT_SPECS, ...SEVERITY_SPECS };
