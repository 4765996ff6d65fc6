// The stable reference points of tests/fixtures/stable/ (generate.py: mpmath, Nolan 1997 integrals, the tail series,
// closed forms), read by the stable tests.
import { readFileSync } from "node:fs";

export interface StableRow {
  model: { family: "stable"; alpha: number; beta: number; scale: number; loc: number; param: "S0" | "S1" };
  x: number;
  pdf: string;
  cdf: string;
  sf: string;
  source: string;
  check: string | null;
  rel_diff: number | null;
}

const load = (name: string) => (JSON.parse(readFileSync(new URL(`../fixtures/stable/${name}`, import.meta.url), "utf8")) as { points: StableRow[] }).points;

/** the chosen cases (stable.json) and a sample of the points scripts/bench-direct.ts draws (bench-sample.json) */
export const stableReferencePoints = (): StableRow[] => [...load("stable.json"), ...load("bench-sample.json")];
