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
