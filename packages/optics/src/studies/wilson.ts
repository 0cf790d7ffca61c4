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

// Acklam's rational approximation of the normal quantile (relative error < 1.15e-9); hand-written because
// simple-statistics' probit (an erf-inverse approximation) is off by 3e-3 at 0.975 (1.9572 instead of 1.9600).
const ACKLAM_A = [
  -39.69683028665376, 220.9460984245205, -275.9285104469687, 138.357751867269, -30.66479806614716,
  2.506628277459239,
];
const ACKLAM_B = [
  -54.47609879822406, 161.5858368580409, -155.6989798598866, 66.80131188771972, -13.28068155288572,
];
const ACKLAM_C = [
  -0.007784894002430293, -0.3223964580411365, -2.400758277161838, -2.549732539343734, 4.374664141464968,
  2.938163982698783,
];
const ACKLAM_D = [0.007784695709041462, 0.3224671290700398, 2.445134137142996, 3.754408661907416];

/**
 * Standard normal quantile Φ⁻¹(p) for 0 < p < 1 (P. J. Acklam's algorithm, relative error below 1.15e-9).
 * Check values: Φ⁻¹(0.975) = 1.959964, Φ⁻¹(0.95) = 1.644854 (standard normal tables).
 */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`normalQuantile: p must be in (0, 1), got ${p}`);
  const [a0, a1, a2, a3, a4, a5] = ACKLAM_A as [number, number, number, number, number, number];
  const [b0, b1, b2, b3, b4] = ACKLAM_B as [number, number, number, number, number];
  const [c0, c1, c2, c3, c4, c5] = ACKLAM_C as [number, number, number, number, number, number];
  const [d0, d1, d2, d3] = ACKLAM_D as [number, number, number, number];
  const pLow = 0.02425;
  if (p < pLow) {
    const q = Math.sqrt(-2 * Math.log(p));
    return (
      (((((c0 * q + c1) * q + c2) * q + c3) * q + c4) * q + c5) /
      ((((d0 * q + d1) * q + d2) * q + d3) * q + 1)
    );
  }
  if (p > 1 - pLow) return -normalQuantile(1 - p);
  const q = p - 0.5;
  const r = q * q;
  return (
    ((((((a0 * r + a1) * r + a2) * r + a3) * r + a4) * r + a5) * q) /
    (((((b0 * r + b1) * r + b2) * r + b3) * r + b4) * r + 1)
  );
}

/** The z of a two-sided interval at `confidence` (0.5 ≤ confidence < 1): Φ⁻¹(1 − (1 − confidence)/2). */
export function zForConfidence(confidence: number): number {
  if (!(confidence >= 0.5 && confidence < 1))
    throw new RangeError(`confidence must be in [0.5, 1), got ${confidence}`);
  // Keep the exact constant at 95 % so that intervals computed either way are bit-identical.
  return confidence === 0.95 ? Z_95 : normalQuantile(1 - (1 - confidence) / 2);
}

/**
 * Lower limit of the two-sided Wilson score interval at `confidence` (default 0.95): the yield that the
 * release gate compares with the target. `successes` of `n` trials passed.
 */
export function wilsonLowerBound(successes: number, n: number, confidence = 0.95): number {
  return wilsonInterval(successes, n, zForConfidence(confidence)).low;
}
