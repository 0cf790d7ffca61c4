/** Two-sided 95 % standard normal quantile, Φ⁻¹(0.975). */
export const Z_95 = 1.959964;

/** A binomial-proportion confidence interval. */
export interface ProportionInterval {
  low: number;
  high: number;
  confidence: number;
  method: "wilson";
}

/**
 * Wilson score interval for a binomial proportion (Wilson, JASA 22:209, 1927; method 3 in
 * Newcombe, Statistics in Medicine 17:857, 1998):
 *   centre = (p̂ + z²/2n) / (1 + z²/n),  half = z √(p̂(1−p̂)/n + z²/4n²) / (1 + z²/n).
 * Unlike the Wald interval it stays inside [0, 1] and is sensible at 0 or n successes.
 * `confidence` is reported as 0.95 for the default z; for another z it is 2Φ(z) − 1.
 */
export function wilsonInterval(successes: number, n: number, z: number = Z_95): ProportionInterval {
  if (!Number.isInteger(n) || n < 1)
    throw new RangeError(`wilsonInterval: n must be a positive integer, got ${n}`);
  if (!Number.isInteger(successes) || successes < 0 || successes > n) {
    throw new RangeError(`wilsonInterval: successes must be an integer in 0..${n}, got ${successes}`);
  }
  if (!(z > 0) || !Number.isFinite(z))
    throw new RangeError(`wilsonInterval: z must be a positive number, got ${z}`);
  const p = successes / n;
  const z2 = z * z;
  const denom = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denom;
  const half = (z * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n))) / denom;
  // Clamp rounding noise at the ends: at 0 successes the low limit is exactly 0, at n the high is 1.
  const low = successes === 0 ? 0 : Math.max(0, centre - half);
  const high = successes === n ? 1 : Math.min(1, centre + half);
  const confidence = z === Z_95 ? 0.95 : 2 * normalCdf(z) - 1;
  return { low, high, confidence, method: "wilson" };
}

/** Standard normal CDF via the Abramowitz & Stegun 7.1.26 erf approximation (|error| < 1.5e-7). */
function normalCdf(x: number): number {
  const t = 1 / (1 + 0.3275911 * (Math.abs(x) / Math.SQRT2));
  const y =
    1 -
    ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) *
      t *
      Math.exp(-(x * x) / 2);
  return x >= 0 ? 0.5 * (1 + y) : 0.5 * (1 - y);
}
