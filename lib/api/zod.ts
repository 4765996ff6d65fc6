import { extendZodWithOpenApi } from "@asteasolutions/zod-to-openapi";
import { z } from "zod";

// Adds .openapi() to zod schemas; imported by every API schema module before use.
extendZodWithOpenApi(z);

export { z };

/** The params a schema puts on an issue that breaches one of the engine's limits (answered as limit_exceeded). */
export const LIMIT_PARAMS = { sumfoldLimit: true } as const;
export const isLimitIssue = (i: { code: string; params?: Record<string, unknown> }) => i.code === "custom" && i.params?.sumfoldLimit === true;

/**
 * An upper bound that is a limit of the engine rather than a rule of the notation: a breach answers 422
 * `limit_exceeded` (as the docs promise), not `validation`. Numbers are bounded by value, arrays by length;
 * the bound still appears in the OpenAPI document as maximum / maxItems.
 */
export function withinLimit<T extends z.ZodNumber | z.ZodArray<z.ZodType>>(schema: T, max: number, message: string): T {
  const bounded = schema.superRefine((v: unknown, ctx) => {
    const n = Array.isArray(v) ? v.length : (v as number);
    if (n > max) ctx.addIssue({ code: "custom", message, params: LIMIT_PARAMS, input: v });
  });
  return bounded.openapi(schema instanceof z.ZodArray ? { maxItems: max } : { maximum: max }) as unknown as T;
}

/** A short rendering of what a client sent, for "(got ...)" in a message. */
const shown = (v: unknown) => (typeof v === "string" ? JSON.stringify(v.length > 40 ? `${v.slice(0, 40)}…` : v) : v === undefined ? "nothing" : Array.isArray(v) ? "a list" : v === null ? "null" : typeof v === "object" ? "an object" : String(v));

/** A probability level in (0, 1); each message names the value sent. */
export const levelSchema = () =>
  z
    .number({ error: (iss) => `each level must be a number strictly between 0 and 1, e.g. 0.99 (got ${shown(iss.input)})` })
    .gt(0, { error: (iss) => `levels must be strictly between 0 and 1 (got ${shown(iss.input)})` })
    .lt(1, { error: (iss) => `levels must be strictly between 0 and 1 (got ${shown(iss.input)})` });

/** A list of levels: a lone number or a string in its place is named, with the form expected. */
export const levelList = () => z.array(levelSchema(), { error: (iss) => `levels are given as a list, e.g. [0.5, 0.99] (got ${shown(iss.input)})` });
