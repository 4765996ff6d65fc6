/**
 * Compute units: the work a request asks for, known before it runs, so the monthly quota can be checked
 * first. units = max(1, ceil(work / 1000)), with work per endpoint:
 *   cf         points x size
 *   density    points x size x 4          (points = x.length, grid.count, or 1024 for an automatic grid)
 *   quantiles  levels x size x 64         (x 2 with expected shortfall)
 *   moments    order x size x 8
 *   convolve   L x log2(L) x (1 + log2(power)), L = the padded length of the result
 *   catalogue  1
 * size = nodes of the model tree + (values in inline samples and lattice tables) / 100.
 */
export const UNIT_WORK = 1000;

export function modelSize(model: unknown): number {
  let size = 0;
  const walk = (v: unknown) => {
    if (Array.isArray(v)) {
      if (v.length > 0 && typeof v[0] === "number") size += v.length / 100;
      else v.forEach(walk);
    } else if (v && typeof v === "object") {
      const o = v as Record<string, unknown>;
      if ("family" in o || "sum" in o || "scale" in o || "shift" in o || "repeat" in o || "mix" in o || "compound" in o || "lattice" in o || "sample" in o || "dataset" in o) size += 1;
      Object.values(o).forEach(walk);
    }
  };
  walk(model);
  return Math.max(1, size);
}

export const toUnits = (work: number) => Math.max(1, Math.ceil(work / UNIT_WORK));

export function pointsOf(body: { x?: number[]; grid?: { count: number }; t?: number[] | { count: number } }): number {
  if (Array.isArray(body.x)) return body.x.length;
  if (body.grid) return body.grid.count;
  if (Array.isArray(body.t)) return body.t.length;
  if (body.t && typeof body.t === "object") return body.t.count;
  return 1024;
}
