/**
 * Fast stack evaluator for Monte Carlo, sensitivity, refinement and the live chart.
 *
 * Optical constants, refraction angles and admittances are tabulated once at creation; each
 * `evaluate` call only redoes the thickness-dependent layer matrices (unless an index scale is
 * given, which forces q = N cos θ and η to be recomputed per layer and wavelength). No
 * allocation happens inside `evaluate`. Same kernel and conventions as computeSpectrum:
 * N = n − ik, characteristic matrices after Macleod, incoherent substrate back surface.
 */
import type { Design } from "./design.ts";
import { PolKernel, prepareStack, tabulate, type Polarization } from "./kernel.ts";

/** Intensity outputs, fractions 0..1, one entry per wavelength. */
export interface RTA {
  R: Float64Array;
  T: Float64Array;
  A: Float64Array;
}

/** Options of {@link createStackEvaluator}. */
export interface StackEvaluatorOptions {
  /** vacuum wavelengths, nm */
  wavelengths: ArrayLike<number>;
  /** angle of incidence in the incident medium, degrees, [0, 90) */
  angleDeg: number;
  polarization: Polarization;
}

/** A preallocated evaluator for one design, wavelength grid, angle and polarization. */
export interface StackEvaluator {
  /** number of layers (deposition order) */
  readonly layerCount: number;
  readonly wavelengths: Float64Array;
  /** the design's layer thicknesses, nm, deposition order (a copy: safe to read) */
  readonly nominalThicknesses: Float64Array;
  readonly angleDeg: number;
  readonly polarization: Polarization;
  /** notes from material tabulation (for example clamped table values) */
  readonly warnings: readonly string[];
  /**
   * Compute R, T, A (intensities, fractions) for the given physical thicknesses (nm,
   * deposition order, length `layerCount`) into `out` (arrays of at least the grid length).
   * `indexScale` (optional, length `layerCount`) multiplies each layer's N (n and k) by a
   * factor, 1 = nominal. With a counted back surface the result is the incoherent total.
   */
  evaluate(thicknessesNm: Float64Array, out: RTA, indexScale?: Float64Array): void;
}

/**
 * Create a fast evaluator. Throws RangeError for bad wavelengths, angle, or materials.
 */
export function createStackEvaluator(design: Design, options: StackEvaluatorOptions): StackEvaluator {
  const { polarization, angleDeg } = options;
  if (polarization !== "s" && polarization !== "p" && polarization !== "u") {
    throw new RangeError(`polarization: expected "s", "p" or "u", got ${JSON.stringify(polarization)}`);
  }
  const prep = prepareStack(design, options.wavelengths);
  const W = prep.W;
  const L = prep.L;
  // at normal incidence η_p = N²/q = N = η_s, so "u" needs one polarization only
  const single = polarization === "u" && angleDeg === 0;
  const ks = polarization === "p" ? undefined : new PolKernel(tabulate(prep, angleDeg, "s"));
  const kp = polarization === "s" || single ? undefined : new PolKernel(tabulate(prep, angleDeg, "p"));
  const sR = new Float64Array(W);
  const sT = new Float64Array(W);
  const sA = new Float64Array(W);
  const pR = new Float64Array(W);
  const pT = new Float64Array(W);
  const pA = new Float64Array(W);
  const check = (d: Float64Array, out: RTA, scale?: Float64Array): void => {
    if (d.length !== L) {
      throw new RangeError(`thicknessesNm: expected ${L} layer thicknesses, got ${d.length}`);
    }
    if (out.R.length < W || out.T.length < W || out.A.length < W) {
      throw new RangeError(`out: expected arrays of at least ${W} wavelengths`);
    }
    if (scale) {
      if (scale.length !== L) throw new RangeError(`indexScale: expected ${L} factors, got ${scale.length}`);
      for (let j = 0; j < L; j++) {
        const f = scale[j]!;
        if (!(f > 0) || !Number.isFinite(f)) {
          throw new RangeError(`indexScale[${j}]: expected a finite factor > 0, got ${String(f)}`);
        }
      }
    }
  };
  const evaluate = (d: Float64Array, out: RTA, indexScale?: Float64Array): void => {
    check(d, out, indexScale);
    if (ks && kp) {
      ks.run(d, indexScale, sR, sT, sA);
      kp.run(d, indexScale, pR, pT, pA);
      const R = out.R;
      const T = out.T;
      const A = out.A;
      for (let w = 0; w < W; w++) {
        R[w] = 0.5 * (sR[w]! + pR[w]!);
        T[w] = 0.5 * (sT[w]! + pT[w]!);
        A[w] = 0.5 * (sA[w]! + pA[w]!);
      }
    } else {
      (ks ?? kp)!.run(d, indexScale, out.R, out.T, out.A);
    }
  };
  return {
    layerCount: L,
    wavelengths: prep.wavelengths,
    nominalThicknesses: Float64Array.from(prep.nominal),
    angleDeg,
    polarization,
    warnings: prep.warnings,
    evaluate,
  };
}
