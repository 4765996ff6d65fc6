import type { Metadata } from "next";
import { PLANS } from "@/lib/api/plans";
import { REDIS_TIMEOUT_MS } from "@/lib/api/rate-limit";
import * as L from "@/lib/cf/limits";
import { Code, Prose } from "../_components/prose";

export const metadata: Metadata = { title: "Limits and rate limits" };

const fmt = (n: number) => n.toLocaleString("en-GB");

export default function LimitsGuide() {
  const engine = [
    ["Points in a grid or point list", L.MAX_GRID_POINTS],
    ["Nodes in a model tree", L.MAX_MODEL_NODES],
    ["Nesting depth of a model", L.MAX_DEPTH],
    ["n in repeat", L.MAX_REPEAT],
    ["Values in a sample", L.MAX_SAMPLE],
    ["Length of a lattice table", L.MAX_LATTICE],
    ["Moment order", L.MAX_MOMENT_ORDER],
  ] as const;
  return (
    <Prose>
      <h1>Limits and rate limits</h1>
      <h2>Engine limits</h2>
      <p>
        A request beyond one of these answers <code>422</code> with type <code>limit_exceeded</code>, naming the limit and pointing
        at the field. Request bodies are limited to 1 MiB.
      </p>
      <table>
        <tbody>
          {engine.map(([label, v]) => (
            <tr key={label}>
              <td>{label}</td>
              <td>{fmt(v)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <h2>Plans</h2>
      <table>
        <thead>
          <tr>
            <th>plan</th>
            <th>requests per second, per key</th>
            <th>compute units per month, per organisation</th>
          </tr>
        </thead>
        <tbody>
          {Object.values(PLANS).map((p) => (
            <tr key={p.label}>
              <td>{p.label}</td>
              <td>{fmt(p.requestsPerSecond)}</td>
              <td>{fmt(p.monthlyUnits)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <h2>Rate-limit headers</h2>
      <p>
        Successful responses carry the fields of the IETF draft <em>RateLimit header fields for HTTP</em>
        (draft-ietf-httpapi-ratelimit-headers-11): the policy (quota <code>q</code> per window of <code>w</code> seconds) and the
        current state (remaining <code>r</code>, seconds to reset <code>t</code>).
      </p>
      <Code>{`RateLimit-Policy: "per-key";q=50;w=1
RateLimit: "per-key";r=49;t=1`}</Code>
      <p>
        When the window is spent the answer is <code>429</code> with <code>Retry-After</code> in whole seconds, never earlier than
        the end of the window. When the organisation&rsquo;s monthly units are spent, <code>429</code> with type{" "}
        <code>quota_exhausted</code> and <code>Retry-After</code> pointing at the first day of next month (UTC). Requests refused for
        a bad key never count against any key. Each server instance takes a key&rsquo;s tokens from the shared window in small
        blocks that divide the limit, so a window admits exactly the plan&rsquo;s number of requests however many instances
        serve it; <code>r</code> is that instance&rsquo;s view of what remains.
      </p>
      <h2>When the limiter&rsquo;s store is unreachable</h2>
      <p>
        Limits live in Redis so that every server instance shares them. If Redis does not answer within {REDIS_TIMEOUT_MS} ms, the
        request is decided by a limiter inside the serving instance at the same per-key rate, the monthly quota is not checked for
        that request (usage is still recorded and billed), and the response carries <code>Sumfold-Limiter: local</code>. We keep a
        read-only computation service available rather than refuse work because of the limiter.
      </p>
      <h2>Compute units</h2>
      <p>
        Each successful call is charged <code>max(1, ceil(work / 1000))</code> units, where <em>size</em> is the number of nodes in
        the model tree plus the number of values in inline samples and lattice tables divided by 100:
      </p>
      <table>
        <tbody>
          <tr><td><code>/cf</code></td><td>points × size</td></tr>
          <tr><td><code>/density</code></td><td>points × size × 4 (1 024 points for an automatic grid)</td></tr>
          <tr><td><code>/quantiles</code></td><td>levels × size × 64, doubled with expected shortfall</td></tr>
          <tr><td><code>/moments</code></td><td>order × size × 8</td></tr>
          <tr><td><code>/convolve</code></td><td>L × log2 L × (1 + log2 power), L the padded result length</td></tr>
          <tr><td><code>/families</code>, <code>/datasets</code></td><td>1</td></tr>
        </tbody>
      </table>
      <p>
        Every response&rsquo;s <code>meta</code> reports the units charged, the request id, the engine version and the elapsed time.
        Failed calls are recorded but charge nothing.
      </p>
    </Prose>
  );
}
