import { ApiError } from "@/lib/api/errors";

/** The first path segments the public API serves (app/api/v1/<name>; tests/api/unknown-path.test.ts keeps them equal). */
export const API_V1_NAMES = ["cf", "convolve", "datasets", "density", "families", "health", "jobs", "moments", "openapi.json", "quantiles", "risk"] as const;

/** Levenshtein distance (the classic dynamic programme), for "did you mean" on a mistyped endpoint. */
function distance(a: string, b: string): number {
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const cur = [i];
    for (let j = 1; j <= b.length; j++) cur[j] = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + (a[i - 1] === b[j - 1] ? 0 : 1));
    prev = cur;
  }
  return prev[b.length];
}

/** The 404 problem for a path under /api/v1 that no route serves: names the path, a near endpoint, and where the list is. */
export function unknownPathProblem(method: string, segments: string[]): ApiError {
  const path = `/api/v1/${segments.join("/")}`;
  const first = (segments[0] ?? "").toLowerCase();
  const near = API_V1_NAMES.map((n) => [n, distance(first, n)] as const)
    .filter(([n, d]) => d <= (n.length >= 5 ? 2 : 1) || (first.length >= 3 && n.startsWith(first)))
    .sort((x, y) => x[1] - y[1])[0]?.[0];
  const hint = near && near !== first ? ` Did you mean /api/v1/${near}?` : "";
  return new ApiError("not_found", `There is no endpoint ${method} ${path}.${hint} The endpoints are listed at /docs and in /api/v1/openapi.json.`);
}
