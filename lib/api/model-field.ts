import type { ZodRawShape } from "zod";
import { isCfError } from "@/lib/cf/errors";
import { validateModel } from "@/lib/cf/validate";
import type { Model } from "@/lib/cf/types";
import { ModelRef } from "./common-schemas";
import { toApiError } from "./errors";
import { z } from "./zod";

/**
 * Request schemas name the full model schema (for the OpenAPI document). Validation accepts any value there
 * and hands it to the core's validator, whose messages point at the exact node (`/model/sum/2/of/sigma`) in
 * words a person can act on, where a union's schema error could only say "invalid input".
 */
const anyModel = z.custom<unknown>((v) => v !== undefined, { error: "model is required: a JSON object in the model notation (see /docs/models)" });

/** The documented schema and the validating schema of a request whose `model` field holds a model. */
export function modelRequest<S extends ZodRawShape>(name: string, shape: S) {
  return {
    doc: z.object({ model: ModelRef, ...shape }).strict().openapi(name),
    body: z.object({ model: anyModel, ...shape }).strict(),
  };
}

/** Validates a model found at `pointer` in the body; the core's errors keep their pointer, prefixed. */
export function checkModel(value: unknown, pointer = "/model"): Model {
  try {
    return validateModel(value);
  } catch (e) {
    throw isCfError(e) ? toApiError(e, pointer) : e;
  }
}
