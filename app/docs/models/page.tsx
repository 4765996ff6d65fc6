import type { Metadata } from "next";
import Link from "next/link";
import { aggregateClaimsModel, stableReturnModel, toleranceStackModel } from "@/lib/demo/scenario";
import { Code, Prose } from "../_components/prose";
import { FamilyTable } from "./family-table";

export const metadata: Metadata = { title: "Model notation" };

const json = (v: unknown) => JSON.stringify(v, null, 2);

const nodes: [string, string][] = [
  ['{ "family": NAME, ...parameters }', "A named law; parameters as in the family table below."],
  ['{ "sum": [model, ...] }', "The sum of independent terms: characteristic functions multiply."],
  ['{ "scale": a, "of": model }', "The law of aX; phi(t) becomes phi(at)."],
  ['{ "shift": b, "of": model }', "The law of X + b."],
  ['{ "repeat": n, "of": model }', "The sum of n independent copies."],
  ['{ "mix": [{ "weight": w, "of": model }, ...] }', "A mixture; weights positive and summing to 1."],
  ['{ "compound": { "count": model, "each": model } }', "A random sum: count copies of each, count a law on 0, 1, 2, …"],
  ['{ "lattice": { "origin": x0, "step": h, "p": [...] } }', "A tabulated law on x0 + k h; p non-negative, summing to 1."],
  ['{ "sample": [...], "weights"?: [...] }', "The empirical law of observed values, optionally weighted (a frequency table)."],
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
