import type { Metadata } from "next";
import { PROBLEMS } from "@/lib/api/errors";
import { Code, Prose } from "../_components/prose";

export const metadata: Metadata = { title: "Errors" };

const explain: Record<keyof typeof PROBLEMS, string> = {
  bad_request: "The body is not valid JSON, or empty.",
  unauthorized: "No key, a malformed key (bad checksum), or a key that is unknown, revoked, retired or expired.",
  forbidden: "The key lacks the scope of this endpoint.",
  address_not_allowed:
    "The key is limited to client address ranges (set on the Keys page) and this request came from outside them. The detail names the address the server saw; ask an admin to add its range, or call from an allowed network.",
  not_found: "The object does not exist in the key's organisation: a dataset named in a model (the pointer shows where, e.g. /model/compound/each/dataset), or the id in GET /api/v1/datasets/{id}. Another organisation's dataset reads as missing. A path under /api/v1 that no endpoint serves answers the same type, naming the endpoint it is near (e.g. /api/v1/quantile: did you mean /api/v1/quantiles?).",
  method_not_allowed: "The path exists but not with this method; the Allow header lists the methods it serves.",
  payload_too_large: "The body exceeds 1 MiB. Upload large data as a dataset instead of inlining it.",
  unsupported_media_type: "The body must be sent as application/json.",
  validation: "The body does not match the schema, or the model is not a valid law. `errors` lists each field with a JSON pointer into your body.",
  limit_exceeded: "The model or grid exceeds one of the engine's limits; the detail names it (see Limits).",
  not_applicable: "The computation does not apply to this law, e.g. a density of a law that has none, or a moment that does not exist.",
  compute_budget_exceeded:
    "The computation did not finish within its plan's deadline (see Limits) and was stopped. The body reports `budgetMs`, `elapsedMs`, `workDone` and `advice`: loosen the tolerance, narrow the range, or submit it as a job. It is charged for the time it ran.",
  tolerance_unreached:
    "The engine could not reach the accuracy asked for (the detail names the tolerance); loosen it, or choose points where the law is better resolved.",
  rate_limited: "The key's requests per second are spent; Retry-After says when the window ends.",
  quota_exhausted: "The organisation's compute units for the month are spent; Retry-After points to the first of next month.",
  too_many_concurrent: "The key (or explorer user) already has its plan's number of computations running; retry after one finishes.",
  unavailable: "A dependency is briefly unavailable; retry after the indicated time.",
  internal: "An unexpected failure on our side. It is logged; the body never carries internals.",
};

export default function ErrorsGuide() {
  return (
    <Prose>
      <h1>Errors</h1>
      <p>
        Every error is an RFC 9457 problem document sent as <code>application/problem+json</code>. Its <code>status</code> equals the
        HTTP status, <code>type</code> is one of the URIs below, and <code>instance</code> names the request id (also in the{" "}
        <code>Sumfold-Request-Id</code> header) so support can find it.
      </p>
      <Code label="422 example">{JSON.stringify(
        {
          type: "https://sumfold.example/docs/errors#validation",
          title: "The request is not valid",
          status: 422,
          detail: "sigma must be positive (got -2).",
          instance: "urn:sumfold:request:7f8c1a2e-5b7d-4a8e-9d61-2a1f0c3b4e5d",
          errors: [{ detail: "sigma must be positive (got -2).", pointer: "/model/sum/1/sigma" }],
        },
        null,
        2,
      )}</Code>
      <h2>Problem types</h2>
      <table>
        <thead>
          <tr>
            <th>type (…/docs/errors#)</th>
            <th>status</th>
            <th>meaning</th>
          </tr>
        </thead>
        <tbody>
          {Object.entries(PROBLEMS).map(([code, p]) => (
            <tr key={code} id={code}>
              <td>
                <code>{code}</code>
              </td>
              <td>{p.status}</td>
              <td>{explain[code as keyof typeof PROBLEMS]}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </Prose>
  );
}
