import { toPointer } from "@/lib/cf/errors";
import { MAX_MODEL_NODES } from "@/lib/cf/limits";
import { ApiError } from "./errors";

/**
 * Limits on the shape of a request body, enforced by an iterative walk (an explicit stack, no recursion) right
 * after JSON parsing and before any validation, so no body under the 1 MiB limit can overflow the stack:
 *   depth       nesting of arrays and objects
 *   containers  arrays and objects in the whole body (a list of numbers counts once)
 *   datasets    dataset references ({ "dataset": ... } objects), each one a model node
 */
export const MAX_JSON_DEPTH = 128;
export const MAX_JSON_CONTAINERS = 20_000;
export const MAX_DATASET_REFS = MAX_MODEL_NODES;

export interface BodyShape {
  depth: number;
  containers: number;
  datasetRefs: number;
}

interface Frame {
  value: unknown;
  depth: number;
  parent: Frame | null;
  key: string | number;
}

const pathOf = (f: Frame): (string | number)[] => {
  const out: (string | number)[] = [];
  for (let x: Frame | null = f; x && x.parent; x = x.parent) out.push(x.key);
  return out.reverse();
};

const refused = (detail: string, f: Frame) => {
  const pointer = toPointer(pathOf(f));
  return new ApiError("limit_exceeded", detail, { errors: [{ detail, pointer }] });
};

/** Walks a parsed JSON value without recursion; throws 422 limit_exceeded with a pointer at the first breach. */
export function checkBodyShape(root: unknown): BodyShape {
  const stack: Frame[] = [{ value: root, depth: 0, parent: null, key: "" }];
  let depth = 0;
  let containers = 0;
  let datasetRefs = 0;
  while (stack.length > 0) {
    const f = stack.pop()!;
    const v = f.value;
    if (v === null || typeof v !== "object") continue;
    const d = f.depth + 1;
    if (d > MAX_JSON_DEPTH) throw refused(`The body nests arrays and objects more than ${MAX_JSON_DEPTH} deep.`, f);
    if (++containers > MAX_JSON_CONTAINERS) throw refused(`The body holds more than ${MAX_JSON_CONTAINERS} arrays and objects.`, f);
    depth = Math.max(depth, d);
    if (Array.isArray(v)) {
      for (let i = v.length - 1; i >= 0; i--) {
        const x = v[i];
        if (x !== null && typeof x === "object") stack.push({ value: x, depth: d, parent: f, key: i });
      }
    } else {
      if (Object.hasOwn(v, "dataset") && ++datasetRefs > MAX_DATASET_REFS) {
        throw refused(`The body holds more than ${MAX_DATASET_REFS} dataset references (each is a model node; the limit is the model's node limit).`, f);
      }
      const keys = Object.keys(v);
      for (let i = keys.length - 1; i >= 0; i--) {
        const x = (v as Record<string, unknown>)[keys[i]];
        if (x !== null && typeof x === "object") stack.push({ value: x, depth: d, parent: f, key: keys[i] });
      }
    }
  }
  return { depth, containers, datasetRefs };
}
