import { aggregateClaimsModel, reinsuranceLayerModel, stableReturnModel, toleranceStackModel } from "@/lib/demo/scenario";

/** One worked request per endpoint, from the demo scenario; used by the OpenAPI document and the docs. */
export const endpointExamples = [
  {
    id: "cf",
    method: "POST",
    path: "/api/v1/cf",
    title: "Characteristic function of a tolerance stack",
    body: { model: toleranceStackModel, t: { from: 0, to: 40, count: 5 } },
  },
  {
    id: "density",
    method: "POST",
    path: "/api/v1/density",
    title: "Density of the currency basket's daily return (a stable law)",
    body: { model: stableReturnModel, grid: { from: -3, to: 3, count: 7 } },
  },
  {
    id: "quantiles",
    method: "POST",
    path: "/api/v1/quantiles",
    title: "Hail-damage aggregate claims: the 99.5% quantile and expected shortfall",
    body: { model: aggregateClaimsModel, p: [0.5, 0.9, 0.995], expectedShortfall: true },
  },
  {
    id: "risk",
    method: "POST",
    path: "/api/v1/risk",
    title: "Harrowgate's per-risk XL layer 250 xs 100: VaR, ES, stop-loss, aggregate layer and the 1-in-200 loss",
    body: {
      model: reinsuranceLayerModel,
      var: { p: [0.995] },
      es: { p: [0.995] },
      stopLoss: [900],
      layerMean: [{ deductible: 900, limit: 300 }],
      exceedance: [1000],
      returnPeriod: [200],
    },
  },
  {
    id: "moments",
    method: "POST",
    path: "/api/v1/moments",
    title: "Moments of the hail-damage aggregate claims",
    body: { model: aggregateClaimsModel, order: 4 },
  },
  {
    id: "convolve",
    method: "POST",
    path: "/api/v1/convolve",
    title: "Two independent claim-count tables, convolved",
    body: {
      terms: [
        { origin: 0, step: 1, p: [0.6, 0.3, 0.1] },
        { origin: 0, step: 1, p: [0.5, 0.5] },
      ],
    },
  },
  { id: "families", method: "GET", path: "/api/v1/families", title: "The family catalogue", body: null },
] as const;

export type EndpointExample = (typeof endpointExamples)[number];
/** A call a snippet shows: the docs' examples, and the explorer's current request. */
export type SnippetCall = { method: string; path: string; body: unknown };

export function curlSnippet(e: SnippetCall, base = "https://sumfold.example"): string {
  const head = `curl -sS ${e.method === "GET" ? "" : "-X POST "}${base}${e.path} \\\n  -H "Authorization: Bearer $SUMFOLD_KEY"`;
  if (!e.body) return head;
  return `${head} \\\n  -H "Content-Type: application/json" \\\n  -d '${JSON.stringify(e.body).replace(/'/g, "'\\''")}'`;
}

export function fetchSnippet(e: SnippetCall, base = "https://sumfold.example"): string {
  const body = e.body ? `,\n  headers: { ...auth, "Content-Type": "application/json" },\n  body: JSON.stringify(${JSON.stringify(e.body, null, 2).replace(/\n/g, "\n  ")}),` : ",\n  headers: auth,";
  return `const auth = { Authorization: \`Bearer \${process.env.SUMFOLD_KEY}\` };
const res = await fetch("${base}${e.path}", {
  method: "${e.method}"${body}
});
if (!res.ok) throw new Error((await res.json()).detail); // problem+json
const data = await res.json();`;
}

export function pythonSnippet(e: SnippetCall, base = "https://sumfold.example"): string {
  const py = (v: unknown): string => JSON.stringify(v, null, 4).replace(/\btrue\b/g, "True").replace(/\bfalse\b/g, "False").replace(/\bnull\b/g, "None");
  const call = e.body ? `requests.post(\n    "${base}${e.path}",\n    headers=headers,\n    json=${py(e.body).replace(/\n/g, "\n    ")},\n    timeout=30,\n)` : `requests.get("${base}${e.path}", headers=headers, timeout=30)`;
  return `import os
import requests

headers = {"Authorization": f"Bearer {os.environ['SUMFOLD_KEY']}"}
res = ${call}
res.raise_for_status()
data = res.json()`;
}
