import Link from "next/link";
import { aggregateClaimsModel } from "@/lib/demo/scenario";
import { LandingExample } from "./_components/landing-example";

// The example names the address this server is reached at, read at request time.
export const dynamic = "force-dynamic";

const audiences = [
  {
    title: "Aggregate claims",
    body: "A random number of random-sized losses: compound Poisson, binomial and negative-binomial sums, with the atom at zero kept apart.",
  },
  {
    title: "Risk of a portfolio",
    body: "Quantiles and expected shortfall of a sum of independent exposures, read far into the upper tail with relative accuracy.",
  },
  {
    title: "Tolerance stacks",
    body: "Stack independent part variations — normal, uniform, tabulated — and read the assembly's limits.",
  },
  {
    title: "Laws known by their transform",
    body: "Stable, variance-gamma and normal-inverse-Gaussian laws have no closed-form density. Their characteristic function is enough.",
  },
];

export default function Home() {
  return (
    <>
      <section className="border-b border-paper-line bg-gradient-to-b from-paper-warm to-paper">
        <div className="mx-auto grid max-w-page gap-10 px-5 py-16 md:grid-cols-[1.1fr_1fr] md:items-center">
          <div>
            <h1 className="font-display text-4xl font-bold leading-tight tracking-tight md:text-5xl">
              The law of a sum, <span className="text-fold-600">folded</span> from its parts.
            </h1>
            <p className="mt-5 max-w-xl text-lg text-ink-soft">
              Describe independent pieces as JSON — named families, sums, scalings, mixtures, random-count sums, tabulated
              lattices, your own samples. Sumfold multiplies their characteristic functions and inverts the product to a
              density, CDF, quantiles and expected shortfall, each with a derived error bound that is never below the actual error, plus exact moments
              and cumulants where they exist.
            </p>
            <div className="mt-8 flex flex-wrap gap-3">
              <Link href="/docs" className="rounded-md bg-fold-600 px-4 py-2 font-semibold text-white hover:bg-fold-700">
                Read the API reference
              </Link>
              <Link href="/sign-in" className="rounded-md border border-ink/20 px-4 py-2 font-semibold hover:border-fold-500">
                Sign in to get a key
              </Link>
            </div>
          </div>
          <LandingExample model={aggregateClaimsModel} base={process.env.SUMFOLD_BASE_URL ?? "http://127.0.0.1:3000"} />
        </div>
      </section>
      <section className="mx-auto max-w-page px-5 py-14" aria-labelledby="for-whom">
        <h2 id="for-whom" className="font-display text-2xl font-semibold">
          Built for quantitative developers
        </h2>
        <ul className="mt-6 grid gap-5 sm:grid-cols-2 lg:grid-cols-4">
          {audiences.map((a) => (
            <li key={a.title} className="rounded-lg border border-paper-line bg-white/60 p-5">
              <h3 className="font-semibold">{a.title}</h3>
              <p className="mt-2 text-sm text-ink-soft">{a.body}</p>
            </li>
          ))}
        </ul>
      </section>
    </>
  );
}
