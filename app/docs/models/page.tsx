import type { Metadata } from "next";
import Link from "next/link";
import { aggregateClaimsModel, harrowgateGroundUp, kestrelShaftStack, reinsuranceLayerModel, stableReturnModel, toleranceStackModel } from "@/lib/demo/scenario";
import { OPERATOR_SPECS } from "@/lib/cf/notation";
import { Code, Prose } from "../_components/prose";
import { FamilyTable } from "./family-table";

export const metadata: Metadata = { title: "Model notation" };

const json = (v: unknown) => JSON.stringify(v, null, 2);

const nodes: [string, string][] = [
  ['{ "family": NAME, ...parameters }', "A named law; parameters as in the family table below."],
  ...OPERATOR_SPECS.map((o): [string, string] => [o.syntax, o.guide]),
  ['{ "dataset": "ds_…", "version"?: n }', "The empirical law of a dataset uploaded in the portal (the latest version when omitted)."],
];

export default function ModelsGuide() {
  return (
    <Prose>
      <h1>Model notation</h1>
      <p>
        A model is a JSON tree. Leaves are named laws, tabulated lattices or samples; inner nodes combine independent parts. Every
        parameter is checked, and an invalid model answers <code>422</code> with a JSON pointer to the offending field, e.g.{" "}
        <code>/model/sum/2/of/sigma</code>.
      </p>
      <p>
        The worked examples below show a model on its own; a request carries it as its <code>model</code> field, e.g.{" "}
        <code>POST /api/v1/quantiles</code> with <code>{'{ "model": { … }, "p": [0.99], "expectedShortfall": true }'}</code>. Blocks
        labelled <em>request body</em> are sent as they stand. The <Link className="text-fold-600 underline" href="/docs/snippets">code snippets</Link>{" "}
        show whole calls.
      </p>
      <table>
        <thead>
          <tr>
            <th>node</th>
            <th>meaning</th>
          </tr>
        </thead>
        <tbody>
          {nodes.map(([n, m]) => (
            <tr key={n}>
              <td>
                <code>{n}</code>
              </td>
              <td>{m}</td>
            </tr>
          ))}
        </tbody>
      </table>

      <h2>Worked example: aggregate claims</h2>
      <p>
        Harrowgate Mutual (an invented insurer) expects 42 hail claims a year, each gamma-distributed with shape 1.8 and rate 0.12
        (EUR thousands). The yearly total is a compound Poisson law. It has an atom at zero (no claims at all, probability
        e<sup>−42</sup>) and a density elsewhere; the API reports the atom separately.
      </p>
      <Code label="model">{json(aggregateClaimsModel)}</Code>
      <p>
        <Link className="font-semibold text-fold-600 underline" href="/explorer?example=claims">Open this example in the explorer</Link>
      </p>

      <h2>Worked example: a tolerance stack</h2>
      <p>
        Kestrel Precision Works (invented) stacks five parts: two machined lengths with normal variation and three cast lengths
        uniform within their tolerance bands. The assembly length is their sum.
      </p>
      <Code label="model">{json(toleranceStackModel)}</Code>
      <p>
        <Link className="font-semibold text-fold-600 underline" href="/explorer?example=stack">Open this example in the explorer</Link>
      </p>

      <h2>Worked example: a reinsurance programme</h2>
      <p>
        Harrowgate Mutual (invented) buys per-risk excess-of-loss cover on its property book: about 42 claims a year, each
        ground-up claim lomax (the actuarial Pareto) with alpha 2.4 and theta 60, in EUR thousands. The first layer pays 250 xs 100
        of each claim; a second layer pays 500 xs 350 and the reinsurer takes a 60% share of it. Each layer is a per-claim{" "}
        <code>layer</code> inside the compound:
      </p>
      <Code label="ground-up claim">{json(harrowgateGroundUp)}</Code>
      <Code label="first layer, 250 xs 100">{json(reinsuranceLayerModel)}</Code>
      <Code label="second layer, 60% of 500 xs 350">
        {json({ compound: { count: { family: "poisson", lambda: 42 }, each: { layer: { deductible: 350, limit: 500, share: 0.6 }, of: harrowgateGroundUp } } })}
      </Code>
      <p>
        <code>POST /api/v1/risk</code> then reads the reinsurer&apos;s view of a layer: the 1-in-200-year loss (<code>returnPeriod: [200]</code>),
        VaR and ES at 99.5%, an aggregate stop-loss premium above a retention, an aggregate layer of the layer, and exceedance
        probabilities. Every value comes with its own error bound; a measure that does not exist answers null with the reason in{" "}
        <code>notes</code>.
      </p>
      <Code label="request body, POST /api/v1/risk">
        {json({ model: reinsuranceLayerModel, var: { p: [0.995] }, es: { p: [0.995] }, stopLoss: [900], layerMean: [{ deductible: 900, limit: 300 }], returnPeriod: [200] })}
      </Code>

      <h2>Worked example: parts per million outside the spec</h2>
      <p>
        Kestrel Precision Works (invented) stacks a pump shaft from a machined part (normal), two cast parts whose lengths are
        triangular between their lowest, likeliest and highest values, and a bought-in seal given by minimum, most likely and maximum
        (PERT). The drawing allows 64.00 ± 0.08 mm. The <code>outside</code> measure of <code>POST /api/v1/risk</code> gives P(S &lt; lsl) + P(S &gt; usl) and the same in
        parts per million:
      </p>
      <Code label="request body, POST /api/v1/risk">{json({ model: kestrelShaftStack, outside: { lsl: 63.92, usl: 64.08 } })}</Code>

      <h2>Reading the tails</h2>
      <p>
        <code>var</code> and <code>es</code> take <code>tail: &quot;upper&quot;</code> (default: losses as positive numbers, levels near 1) or{" "}
        <code>&quot;lower&quot;</code> (returns, levels near 0): for a daily return at p = 0.01 the lower tail gives VaR = q(0.01) and ES = E[X | X ≤
        q(0.01)], the average of the worst 1% of days. <code>/api/v1/quantiles</code> takes the same <code>tail</code> option for its
        expected shortfall.
      </p>
      <p className="text-sm">
        Caution: these results are computational aids. Decisions on capital, reserves, reinsurance or safety tolerances rest with
        licensed practice and local regulation.
      </p>

      <h2>Worked example: a stable law</h2>
      <p>
        A heavy-tailed daily return with no closed-form density, given by its characteristic function in the S0 parameterisation
        (continuous in alpha and beta). Its variance does not exist; <code>/moments</code> says so instead of returning a number.
      </p>
      <Code label="model">{json(stableReturnModel)}</Code>
      <p>
        <Link className="font-semibold text-fold-600 underline" href="/explorer?example=stable">Open this example in the explorer</Link>
      </p>

      <h2>Families</h2>
      <p>
        The same catalogue is served as JSON by <code>GET /api/v1/families</code>. See the{" "}
        <Link className="text-fold-600 underline" href="/docs">reference</Link> for each endpoint.
      </p>
      <FamilyTable />
    </Prose>
  );
}
