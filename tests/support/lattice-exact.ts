// Exact references for lattice tests (lattice, lattice-panjer, table-rounding-bounds): dice and binomial laws as
// big-integer rationals (common practice: the counts by dynamic programming and C(n, k) num^k (den - num)^(n - k) /
// den^n), rounded once to the nearest double.
/** Exact probabilities of the sum of n fair s-sided dice: counts by integer dynamic programming / s^n. */
export function diceExact(n: number, s: number): number[] {
  let ways: bigint[] = [1n];
  for (let d = 0; d < n; d++) {
    const next = new Array<bigint>(ways.length + s - 1).fill(0n);
    for (let i = 0; i < ways.length; i++) for (let f = 0; f < s; f++) next[i + f] += ways[i];
    ways = next;
  }
  const total = BigInt(s) ** BigInt(n);
  return ways.map((w) => ratio(w, total));
}

/** w / total as the nearest double (exact big-integer division to 2^-80 before rounding). */
export function ratio(w: bigint, total: bigint): number {
  const scaled = (w << 80n) / total;
  return Number(scaled) / 2 ** 80;
}

export function binomExact(n: number, num: bigint, den: bigint): number[] {
  // P(k) = C(n,k) num^k (den-num)^{n-k} / den^n, exact
  const out: number[] = [];
  let c = 1n;
  const total = den ** BigInt(n);
  for (let k = 0; k <= n; k++) {
    if (k > 0) c = (c * BigInt(n - k + 1)) / BigInt(k);
    out.push(ratio(c * num ** BigInt(k) * (den - num) ** BigInt(n - k), total));
  }
  return out;
}

export function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let k = 0; k < Math.max(a.length, b.length); k++) m = Math.max(m, Math.abs((a[k] ?? 0) - (b[k] ?? 0)));
  return m;
}
