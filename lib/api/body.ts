import type { z } from "zod";
import { toPointer } from "@/lib/cf/errors";
import { ApiError, type FieldError } from "./errors";
import { checkBodyShape } from "./walk";
import { isLimitIssue } from "./zod";

type Flagged = FieldError & { limit?: boolean };

export const MAX_BODY_BYTES = 1024 * 1024;

/** RFC 6901 pointer from a zod issue path (the core's encoder; symbols, never used as keys here, become text). */
const pointerOf = (path: readonly PropertyKey[]) => toPointer(path.map((k) => (typeof k === "symbol" ? String(k) : k)));

/** Reads a JSON body: 415 unless JSON, 413 past 1 MiB (counted while streaming), 400 when malformed. */
export async function readJson(req: Request): Promise<unknown> {
  const type = (req.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  if (type !== "application/json" && !type.endsWith("+json")) {
    throw new ApiError("unsupported_media_type", `Send the body as application/json (got "${type || "no Content-Type"}").`);
  }
  const declared = Number(req.headers.get("content-length") ?? NaN);
  if (declared > MAX_BODY_BYTES) throw tooLarge();
  const chunks: Uint8Array[] = [];
  let size = 0;
  if (req.body) {
    const reader = req.body.getReader();
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      size += value.byteLength;
      if (size > MAX_BODY_BYTES) {
        await reader.cancel();
        throw tooLarge();
      }
      chunks.push(value);
    }
  }
  const text = Buffer.concat(chunks).toString("utf8");
  if (text.trim() === "") throw new ApiError("bad_request", "The request body is empty; send a JSON object.");
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    throw new ApiError("bad_request", `The request body is not valid JSON: ${(e as Error).message}`);
  }
  // Depth, container and dataset-reference limits, checked without recursion before any validation.
  checkBodyShape(value);
  return value;
}

const tooLarge = () => new ApiError("payload_too_large", `The request body exceeds ${MAX_BODY_BYTES} bytes (1 MiB).`);

type Issue = z.core.$ZodIssue;

/** Flattens zod issues to field errors; for a union, reports the branch that got furthest into the value. */
function fieldErrors(issues: readonly Issue[], prefix: readonly PropertyKey[] = []): Flagged[] {
  return issues.flatMap((i): Flagged[] => {
    const path = [...prefix, ...i.path];
    if (i.code === "unrecognized_keys") {
      return i.keys.map((k) => ({ detail: `Unknown field "${k}".`, pointer: pointerOf([...path, k]) }));
    }
    if (i.code === "invalid_union" && i.errors.length > 0) {
      const depth = (branch: readonly Issue[]) => Math.max(...branch.map((b) => (b.code === "invalid_type" && b.path.length === 0 ? -1 : b.path.length)));
      const best = [...i.errors].sort((a, b) => depth(b) - depth(a))[0];
      if (depth(best) >= 0) return fieldErrors(best, path);
    }
    return [{ detail: i.message, pointer: pointerOf(path), ...(isLimitIssue(i as { code: string; params?: Record<string, unknown> }) ? { limit: true } : {}) }];
  });
}

/** Validates with a zod schema; failures become 422 with one entry per issue, pointing into the body. */
export function validate<S extends z.ZodType>(schema: S, value: unknown): z.infer<S> {
  const r = schema.safeParse(value);
  if (r.success) return r.data;
  const flagged = fieldErrors(r.error.issues);
  const errors = flagged.map(({ detail, pointer }) => ({ detail, pointer }));
  // Only breaches of the engine's limits (and nothing else wrong) answer limit_exceeded, as the docs say.
  if (flagged.every((e) => e.limit)) throw new ApiError("limit_exceeded", errors[0].detail, { errors });
  throw new ApiError("validation", errors.length === 1 ? errors[0].detail : `${errors.length} fields are not valid: ${errors[0].detail}`, { errors });
}
