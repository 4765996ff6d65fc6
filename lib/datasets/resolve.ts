import "server-only";
import { ApiError } from "@/lib/api/errors";
import { withDbDeadline } from "@/lib/db/client";
import { getDatasetInOrg, getDatasetVersionMeta, readVersionValues } from "@/lib/db/datasets";
import { DATASET_ID } from "./schemas";

/** Decoded values of immutable versions, by version row id; bounded by bytes (least recently used goes first). */
const CACHE_BYTES = 64 * 1024 * 1024;
/** Values (samples, with duplicates counted each time they are used) one request may bring in from datasets. */
export const MAX_DATASET_VALUES_PER_REQUEST = 2_000_000;
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
  const { values, weights } = await withDbDeadline(readVersionValues({ versionId }), 5000);
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

interface Ref {
  node: Record<string, unknown>;
  at: string;
  id: string;
  version: number | undefined;
}

function checkRef(node: Record<string, unknown>, at: string): Ref {
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
  return { node, at, id, version: v as number | undefined };
}

/** Every dataset reference in a model, found without recursion, in document order. */
function findRefs(model: unknown, pointer: string): Ref[] {
  const refs: Ref[] = [];
  const stack: { v: unknown; at: string }[] = [{ v: model, at: pointer }];
  while (stack.length) {
    const { v, at } = stack.pop()!;
    if (Array.isArray(v)) {
      if (v.length === 0 || typeof v[0] === "number") continue;
      for (let i = v.length - 1; i >= 0; i--) stack.push({ v: v[i], at: `${at}/${i}` });
    } else if (v && typeof v === "object") {
      const o = v as Record<string, unknown>;
      if ("dataset" in o) {
        refs.push(checkRef(o, at));
        continue;
      }
      const entries = Object.entries(o);
      for (let i = entries.length - 1; i >= 0; i--) stack.push({ v: entries[i][1], at: `${at}/${escape(entries[i][0])}` });
    }
  }
  return refs;
}

/**
 * Replaces every `{ "dataset": "<id>", "version"?: n }` node anywhere in a model by the dataset's data as
 * `{ "sample": [...] }` (with `"weights": [...]` for a weighted or frequency table); the latest version when
 * none is named. Each distinct (dataset, version) is looked up and loaded once per request (and decoded
 * versions are cached); the values brought in, counted per reference, may not exceed
 * MAX_DATASET_VALUES_PER_REQUEST. Throws ApiError 404 (missing, or of another organisation), 422 (malformed
 * reference, or too many values), each with a JSON pointer. Other nodes are returned as they are (same
 * objects where untouched).
 */
export async function resolveDatasets(model: unknown, organizationId: number, pointer = "/model", where = "this key's organisation"): Promise<unknown> {
  const refs = findRefs(model, pointer);
  if (refs.length === 0) return model;
  const byName = new Map<string, Promise<Record<string, unknown>>>();
  const load = async (r: Ref): Promise<Record<string, unknown>> => {
    const row = await withDbDeadline(getDatasetVersionMeta({ organizationId, publicId: r.id, version: r.version }));
    if (!row) {
      // Another organisation's dataset reads exactly like a missing one.
      const ds = r.version === undefined ? null : await withDbDeadline(getDatasetInOrg({ organizationId, publicId: r.id }));
      const detail = ds ? `Dataset ${r.id} has no version ${r.version}; its latest is ${ds.dataset.latestVersion}.` : `No dataset ${r.id} in ${where}.`;
      throw new ApiError("not_found", detail, { errors: [{ detail, pointer: ds ? `${r.at}/version` : `${r.at}/dataset` }] });
    }
    return { row };
  };
  // Look-ups first (one per distinct reference), then the value budget, then one load per version.
  const metas = new Map<string, Awaited<ReturnType<typeof getDatasetVersionMeta>>>();
  for (const r of refs) {
    const name = `${r.id}@${r.version ?? "latest"}`;
    if (!metas.has(name)) metas.set(name, ((await load(r)) as { row: NonNullable<Awaited<ReturnType<typeof getDatasetVersionMeta>>> }).row);
  }
  let total = 0;
  for (const r of refs) {
    const meta = metas.get(`${r.id}@${r.version ?? "latest"}`)!;
    total += meta.version.rowCount;
    if (total > MAX_DATASET_VALUES_PER_REQUEST) {
      const detail = `The dataset references bring in more than ${MAX_DATASET_VALUES_PER_REQUEST} values (each reference counts its dataset's values).`;
      throw new ApiError("limit_exceeded", detail, { errors: [{ detail, pointer: r.at }] });
    }
  }
  for (const [name, meta] of metas) {
    if (!meta || byName.has(name)) continue;
    byName.set(
      name,
      valuesOf(meta.version.id).then(({ values, weights }) =>
        meta.version.weightKind === "none" || !weights ? { sample: Array.from(values) } : { sample: Array.from(values), weights: Array.from(weights) },
      ),
    );
  }
  const resolved = new Map<Record<string, unknown>, Record<string, unknown>>();
  for (const r of refs) resolved.set(r.node, await byName.get(`${r.id}@${r.version ?? "latest"}`)!);
  // Rebuild the paths that lead to references (depth is bounded by the body walker), sharing everything else.
  const rebuild = (v: unknown): unknown => {
    if (Array.isArray(v)) {
      if (v.length === 0 || typeof v[0] === "number") return v;
      let changed = false;
      const out = v.map((x) => {
        const y = rebuild(x);
        if (y !== x) changed = true;
        return y;
      });
      return changed ? out : v;
    }
    if (v && typeof v === "object") {
      const hit = resolved.get(v as Record<string, unknown>);
      if (hit) return hit;
      let changed = false;
      const out: Record<string, unknown> = {};
      for (const [k, x] of Object.entries(v as Record<string, unknown>)) {
        const y = rebuild(x);
        if (y !== x) changed = true;
        out[k] = y;
      }
      return changed ? out : v;
    }
    return v;
  };
  return rebuild(model);
}

/**
 * The dataset step of a request, run once it is admitted (after the rate limit and the quota): the body with its
 * model's dataset references replaced by their data (see resolveDatasets); the same body when there are none.
 */
export async function resolveBodyDatasets<B>(body: B, at: { organizationId: number; pointer?: string; where?: string }): Promise<B> {
  if (!body || typeof body !== "object" || !("model" in body) || !hasDatasetRef(body.model)) return body;
  return { ...body, model: await resolveDatasets(body.model, at.organizationId, at.pointer ?? "/model", at.where) };
}

/** True when a model holds a dataset reference anywhere (so callers can skip the walk and the database). */
export function hasDatasetRef(model: unknown): boolean {
  const stack: unknown[] = [model];
  while (stack.length) {
    const v = stack.pop();
    if (Array.isArray(v)) {
      if (v.length > 0 && typeof v[0] !== "number") stack.push(...v);
    } else if (v && typeof v === "object") {
      if ("dataset" in v) return true;
      stack.push(...Object.values(v));
    }
  }
  return false;
}
