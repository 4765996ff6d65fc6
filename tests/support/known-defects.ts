// Models on which the engine is known to break an invariant, each with what is wrong. The property tests skip them (and
// print that they did); tests/cf/known-defects.test.ts checks each defect is still there with `it.fails`, so the fix
// turns that test red and the entry is removed here. Keep this list short: a defect belongs here only while its fix
// is pending in another part of the engine.
import type { Model } from "@/lib/cf/types";

export interface KnownDefect {
  model: Model;
  /** what is wrong, with the numbers */
  what: string;
}

export const KNOWN_DEFECTS: KnownDefect[] = [];

const keys = new Set(KNOWN_DEFECTS.map((d) => JSON.stringify(d.model)));
export const knownDefect = (m: Model): KnownDefect | undefined => (keys.has(JSON.stringify(m)) ? KNOWN_DEFECTS.find((d) => JSON.stringify(d.model) === JSON.stringify(m)) : undefined);
