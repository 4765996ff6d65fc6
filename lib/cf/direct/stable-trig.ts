// Trigonometric helpers of log V (./stable-kernel.ts) that keep their relative precision at small arguments.

/** log(sin x / x), accurate for small x (series of log sinc: Abramowitz & Stegun 4.3.71 integrated; common practice). */
export function logSinc(x: number): number {
  if (Math.abs(x) < 0.25) {
    const x2 = x * x;
    return -x2 * (1 / 6 + x2 * (1 / 180 + x2 * (1 / 2835 + x2 * (1 / 37800 + x2 * (1 / 467775 + x2 / 6081075)))));
  }
  return Math.log(Math.sin(x) / x);
}

/** cot x - 1/x (A&S 4.3.70), accurate for small x. */
export function cotm(x: number): number {
  if (Math.abs(x) < 0.25) {
    const x2 = x * x;
    return -x * (1 / 3 + x2 * (1 / 45 + x2 * (2 / 945 + x2 * (1 / 4725 + x2 * (2 / 93555 + x2 * 1382 / 638512875)))));
  }
  return 1 / Math.tan(x) - 1 / x;
}

/** d/dx (cot x - 1/x) = 1/x^2 - 1/sin^2 x. */
export function cotmPrime(x: number): number {
  if (Math.abs(x) < 0.25) {
    const x2 = x * x;
    return -(1 / 3 + x2 * (3 / 45 + x2 * (10 / 945 + x2 * (7 / 4725 + x2 * (18 / 93555 + x2 * 11 * 1382 / 638512875)))));
  }
  const sn = Math.sin(x);
  return 1 / (x * x) - 1 / (sn * sn);
}
