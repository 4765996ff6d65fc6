import type { Metadata } from "next";
import { PLANS } from "@/lib/api/plans";
import { REDIS_TIMEOUT_MS } from "@/lib/api/rate-limit";
import { UNIT_MS } from "@/lib/api/units";
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
            <th>deadline of one computation</th>
            <th>computations at once, per key</th>
            <th>deadline of one job</th>
          </tr>
        </thead>
        <tbody>
          {Object.values(PLANS).map((p) => (
            <tr key={p.label}>
              <td>{p.label}</td>
              <td>{fmt(p.requestsPerSecond)}</td>
              <td>{fmt(p.monthlyUnits)}</td>
              <td>{fmt(p.computeBudgetMs / 1000)} s</td>
              <td>{fmt(p.concurrentComputations)}</td>
              <td>{fmt(p.jobBudgetMs / 1000)} s</td>
            </tr>
          ))}
        </tbody>
      </table>
      <h2>Deadlines</h2>
      <p>
        Every computation runs on a pool of worker threads, one per core, away from the threads that answer health checks,
        check keys and record usage, so a heavy request never holds up a light one for longer than the wait for a free thread.
        Each computation has its plan&rsquo;s deadline above, counted from when a thread starts it. The engine checks the clock
        in its outer loops and stops itself; a thread that has not returned a quarter of a second after the deadline is
        terminated. Either way the answer is <code>422</code> with type <code>compute_budget_exceeded</code>, the deadline
        (<code>budgetMs</code>), the time it ran (<code>elapsedMs</code>), how far it got (<code>workDone</code>) and what to
        do: loosen the tolerance, narrow the range or ask for fewer points, or submit the computation as a job, whose deadline
        is longer (last column) but also finite.
      </p>
      <p>
        A key (and, in the portal&rsquo;s explorer, a user) may have the plan&rsquo;s number of computations running or waiting
        at once, counted across every server instance (each computation holds a lease in Redis that it gives back when it ends,
        and that expires by itself 30 s after the computation&rsquo;s deadline should its instance stop); one more answers{" "}
        <code>429</code> with type <code>too_many_concurrent</code> and <code>Retry-After: 1</code>. While Redis does not
        answer, each instance keeps the cap on its own. When every thread is busy and the wait queue is full, the answer is <code>503</code> with{" "}
        <code>Retry-After</code>.
      </p>
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
      <h2>Jobs</h2>
      <p>
        Work past a request&rsquo;s deadline (large grids, many levels, heavy models) goes to the job queue:{" "}
        <code>POST /api/v1/jobs</code> with <code>{`{ "operation": "density", "body": { ... } }`}</code> answers <code>202</code>{" "}
        with the job&rsquo;s URL; <code>GET /api/v1/jobs/&#123;id&#125;</code> reports <code>queued</code>, <code>running</code>{" "}
        (with the time used of the job&rsquo;s deadline), then <code>succeeded</code> with exactly the result the synchronous endpoint
        gives, or <code>failed</code> with its problem. A job&rsquo;s deadline is the last column of the plan table; results are kept
        24 hours after the job finishes and only the submitting organisation&rsquo;s keys can read them (others get{" "}
        <code>404</code>). Submitting and each poll cost 1 unit; the job is charged for its work like a request.
      </p>
      <h2>Compute units</h2>
      <p>
        Units follow the work the engine actually did. Each computation is timed in its worker thread (the time the engine ran,
        not the wait for a thread or the network), reported as <code>meta.computeMs</code>, and charged after the work:
      </p>
      <Code>{`units = max(1, ceil(computeMs / ${UNIT_MS}))`}</Code>
      <p>
        So one unit buys {UNIT_MS} ms of engine time, a light call costs 1, and a call can never cost more than its deadline
        allows (Starter: at most {fmt(Math.ceil((PLANS.starter.computeBudgetMs + 250) / UNIT_MS))} units). To estimate a bill,
        run a representative request and read <code>meta.computeMs</code> and <code>meta.computeUnits</code>; repeated runs of
        the same request cost about the same. <code>/families</code> and <code>/datasets</code> cost 1.
      </p>
      <p>
        Before the work, the organisation&rsquo;s month must have at least one unit left (else <code>429</code>{" "}
        <code>quota_exhausted</code>). A computation stopped at its deadline is charged for the time it ran (the problem body
        carries <code>computeUnits</code>); other failed calls are recorded but charge nothing. Runs in the portal&rsquo;s
        explorer are charged the same way, count against the same monthly units and per-second rate (per user), and appear in
        usage as the explorer&rsquo;s.
      </p>
    </Prose>
  );
}
