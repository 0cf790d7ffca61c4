/**
 * Constants for the inlined sine/cosine and exponential used in the characteristic-matrix
 * hot loops (the loops inline the arithmetic themselves; these helpers exist for tests and
 * for the non-critical code paths). Both are accurate to about 1 ulp for the arguments the
 * engine produces (|x| < 1e9 rad for sin/cos, −150 ≤ x ≤ 150 for exp).
 *
 * Method: Cody–Waite reduction by π/2 (two-part constant) and the minimax kernels of the
 * freely distributable fdlibm (Sun Microsystems, k_sin.c / k_cos.c); exp by reduction with
 * ln 2 and Taylor series of cosh/sinh of the remainder, so e^x and e^−x come together without
 * a division.
 */

export const S1 = -1.66666666666666324348e-1;
export const S2 = 8.33333333332248946124e-3;
export const S3 = -1.98412698298579493134e-4;
export const S4 = 2.75573137070700676789e-6;
export const S5 = -2.50507602534068634195e-8;
export const S6 = 1.58969099521155010221e-10;
export const C1 = 4.16666666666666019037e-2;
export const C2 = -1.38888888888741095749e-3;
export const C3 = 2.48015872894767294178e-5;
export const C4 = -2.75573143513906633035e-7;
export const C5 = 2.0875723212981748279e-9;
export const C6 = -1.13596475577881948265e-11;
/** first 33 bits of π/2 and the remainder */
export const PIO2_1 = 1.57079632673412561417;
export const PIO2_1T = 6.07710050650619224932e-11;
export const TWO_OVER_PI = 0.6366197723675814;
/** 1.5·2^52: adding and subtracting it rounds a double to the nearest integer */
export const RND = 6755399441055744;
/** cos(qπ/2), sin(qπ/2) for quadrant q = 0..3 */
export const QUAD_C = new Float64Array([1, 0, -1, 0]);
export const QUAD_S = new Float64Array([0, 1, 0, -1]);

export const LOG2E = 1.4426950408889634;
export const LN2_HI = 6.93147180369123816490e-1;
export const LN2_LO = 1.90821492927058770002e-10;
/** POW2[n + POW2_OFFSET] = 2^n for |n| ≤ 256 */
export const POW2_OFFSET = 256;
export const POW2 = (() => {
  const t = new Float64Array(2 * POW2_OFFSET + 1);
  for (let i = 0; i < t.length; i++) t[i] = Math.pow(2, i - POW2_OFFSET);
  return t;
})();
// cosh/sinh Taylor coefficients in z = r²
export const E1 = 1 / 2;
export const E2 = 1 / 24;
export const E3 = 1 / 720;
export const E4 = 1 / 40320;
export const E5 = 1 / 3628800;
export const E6 = 1 / 479001600;
export const O1 = 1 / 6;
export const O2 = 1 / 120;
export const O3 = 1 / 5040;
export const O4 = 1 / 362880;
export const O5 = 1 / 39916800;
export const O6 = 1 / 6227020800;

/** sin and cos of x (radians) written into out[0], out[1]. */
export function sincos(x: number, out: Float64Array): void {
  const nq = x * TWO_OVER_PI + RND - RND;
  const r = x - nq * PIO2_1 - nq * PIO2_1T;
  const z = r * r;
  const sp = r + r * z * (S1 + z * (S2 + z * (S3 + z * (S4 + z * (S5 + z * S6)))));
  const cp = 1 - 0.5 * z + z * z * (C1 + z * (C2 + z * (C3 + z * (C4 + z * (C5 + z * C6)))));
  const q = (nq | 0) & 3;
  const qc = QUAD_C[q] as number;
  const qs = QUAD_S[q] as number;
  out[0] = sp * qc + cp * qs;
  out[1] = cp * qc - sp * qs;
}

/** e^x and e^−x for −150 ≤ x ≤ 150, written into out[0], out[1]. */
export function expPair(x: number, out: Float64Array): void {
  const nn = x * LOG2E + RND - RND;
  const r = x - nn * LN2_HI - nn * LN2_LO;
  const z = r * r;
  const ev = 1 + z * (E1 + z * (E2 + z * (E3 + z * (E4 + z * (E5 + z * E6)))));
  const od = r * (1 + z * (O1 + z * (O2 + z * (O3 + z * (O4 + z * (O5 + z * O6))))));
  const ni = nn | 0;
  out[0] = (ev + od) * (POW2[POW2_OFFSET + ni] as number);
  out[1] = (ev - od) * (POW2[POW2_OFFSET - ni] as number);
}
