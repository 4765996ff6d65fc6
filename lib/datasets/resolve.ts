import "server-only";
import { ApiError } from "@/lib/api/errors";
import { getDatasetInOrg, getDatasetVersionMeta, readVersionValues } from "@/lib/db/datasets";
import { DATASET_ID } from "./schemas";

/** Decoded values of immutable versions, by version row id; bounded by bytes (least recently used goes first). */
const CACHE_BYTES = 256 * 1024 * 1024;
type Entry = { values: Float64Array; weights: Float64Array | null; bytes: number };
const g = globalThis as unknown as { __sumfoldDatasetCache?: Map<number, Entry>; __sumfoldDatasetCacheBytes?: number };
const cache = () => (g.__sumfoldDatasetCache ??= new Map());

async function valuesOf(versionId: number): Promise<Entry> {
  const c = cache();
  const hit = c.get(versionId);
  if (hit) {
    c.delete(versionId);
    c.set(versionId, hit);
    return hit;
  }
  const { values, weights } = await readVersionValues({ versionId });
  const entry = { values, weights, bytes: values.byteLength + (weights?.byteLength ?? 0) };
  let used = (g.__sumfoldDatasetCacheBytes ?? 0) + entry.bytes;
  for (const [k, v] of c) {
    if (used <= CACHE_BYTES) break;
    c.delete(k);
    used -= v.bytes;
  }
  c.set(versionId, entry);
  g.__sumfoldDatasetCacheBytes = used;
  return entry;
}

const escape = (k: string) => k.replace(/~/g, "~0").replace(/\//g, "~1");
const invalid = (detail: string, pointer: string) => new ApiError("validation", detail, { errors: [{ detail, pointer }] });

async function resolveRef(node: Record<string, unknown>, organizationId: number, at: string): Promise<Record<string, unknown>> {
  const extra = Object.keys(node).filter((k) => k !== "dataset" && k !== "version");
  if (extra.length) throw invalid(`A dataset reference holds "dataset" and optionally "version"; remove ${extra.map((k) => JSON.stringify(k)).join(", ")}.`, `${at}/${escape(extra[0])}`);
  const id = node.dataset;
  if (typeof id !== "string" || !DATASET_ID.test(id)) {
    throw invalid(`"dataset" must be a dataset id like "ds_7kq2m9x4c1vbt0hz" (see GET /api/v1/datasets); got ${JSON.stringify(id)?.slice(0, 40)}.`, `${at}/dataset`);
  }
  const v = node.version;
  if (v !== undefined && !(typeof v === "number" && Number.isSafeInteger(v) && v >= 1)) {
    throw invalid(`"version" must be a whole number from 1; got ${JSON.stringify(v)?.slice(0, 40)}.`, `${at}/version`);
  }
  const row = await getDatasetVersionMeta({ organizationId, publicId: id, version: v as number | undefined });
  if (!row) {
    // Another organisation's dataset reads exactly like a missing one.
    const ds = v === undefined ? null : await getDatasetInOrg({ organizationId, publicId: id });
    const detail = ds ? `Dataset ${id} has no version ${v}; its latest is ${ds.dataset.latestVersion}.` : `No dataset ${id} in this key's organisation.`;
    throw new ApiError("not_found", detail, { errors: [{ detail, pointer: ds ? `${at}/version` : `${at}/dataset` }] });
  }
  const { values, weights } = await valuesOf(row.version.id);
  return row.version.weightKind === "none" || !weights ? { sample: Array.from(values) } : { sample: Array.from(values), weights: Array.from(weights) };
}

/**
 * Replaces every `{ "dataset": "<id>", "version"?: n }` node anywhere in a model by the dataset's data as
 * `{ "sample": [...] }` (with `"weights": [...]` for a weighted or frequency table); the latest version when
 * none is named. Throws ApiError 404 (missing, or of another organisation) or 422 (malformed reference), each
 * with a JSON pointer under `pointer`. Other nodes are returned as they are (same objects where untouched).
 */
export async function resolveDatasets(model: unknown, organizationId: number, pointer = "/model"): Promise<unknown> {
  const walk = async (v: unknown, at: string): Promise<unknown> => {
    if (Array.isArray(v)) {
      if (v.length === 0 || typeof v[0] === "number") return v;
      let changed = false;
      const out = await Promise.all(
        v.map(async (x, i) => {
          const r = await walk(x, `${at}/${i}`);
          if (r !== x) changed = true;
          return r;
        }),
      );
      return changed ? out : v;
    }
    if (v && typeof v === "object") {
      const o = v as Record<string, unknown>;
      if ("dataset" in o) return resolveRef(o, organizationId, at);
      let changed = false;
      const out: Record<string, unknown> = {};
      for (const [k, x] of Object.entries(o)) {
        const r = await walk(x, `${at}/${escape(k)}`);
        if (r !== x) changed = true;
        out[k] = r;
      }
      return changed ? out : v;
    }
    return v;
  };
  return walk(model, pointer);
}

/** True when a model holds a dataset reference anywhere (so callers can skip the walk and the database). */
export function hasDatasetRef(model: unknown): boolean {
  if (Array.isArray(model)) return model.length > 0 && typeof model[0] !== "number" && model.some(hasDatasetRef);
  if (model && typeof model === "object") return "dataset" in model || Object.values(model).some(hasDatasetRef);
  return false;
}
