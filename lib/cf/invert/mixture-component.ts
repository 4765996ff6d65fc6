// The shape every mixture component answers in (mixture-components.ts builds them, mixture.ts sums them).
import type { Atom } from "../types";

export interface Value {
  F: number;
  S: number;
  f: number;
  /** bounds on |F - F_true| and |S - S_true| */
  eF: number;
  eS: number;
}

export interface Component {
  w: number;
  atoms: Atom[];
  /** a bound on the error of the atoms' masses, summed (0 or absent where they are exact) */
  atomErr?: number;
  at(x: number): Value;
  /** E[(X - q)^+] and its bound; null when the mean does not exist */
  excess(q: number): { value: number; error: number } | null;
  /**
   * optional: excess at many points at once (a direct law sweeps its tail once for all of them); `allow`: per point, an
   * absolute error the answer may take where that is coarser than its own accuracy (../direct/shortfall.ts)
   */
  excesses?(qs: readonly number[], allow?: readonly number[]): ({ value: number; error: number } | null)[];
  terms(): number;
  notes(): string[];
  /** optional: whether an expected shortfall answered fell short of its goal (a power-tail component's derived bound) */
  shortfallMissed?(): boolean;
  method: string;
  /**
   * A component with a range (the damped route): deferred(true) answers points beyond it from the monotone bound
   * S(x) in [0, S(R)] without growing the range, and remembers the farthest such point where the tail mattered (beyond()),
   * so that the range is grown once, to what the answers need (cover), instead of to twice every probe a search's bracket
   * walk throws past it.
   */
  deferred?(on: boolean): void;
  beyond?(): number;
  reach?(): number;
  /** x lies past the range and the component's tail there is above its share of the target */
  needs?(x: number): boolean;
  cover?(x: number): boolean;
}
