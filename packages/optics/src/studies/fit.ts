import { createStackEvaluator } from "../core/index.ts";
import type { Design } from "../core/index.ts";
import { levenbergMarquardt } from "./least-squares.ts";
import { withThicknesses } from "./refine.ts";
import type { Polarization } from "./spec.ts";

/** A measured spectrum of a built coating: values in percent at wavelengths in nm. */
export interface Measurement {
  wavelengths: number[];
  values: number[];
  quantity: "R" | "T";
  angleDeg: number;
  polarization: Polarization;
}

/** Options of {@link fitAsBuilt}. */
export interface FitOptions {
  /** Also fit one refractive-index scale factor per layer material (default false). */
  fitIndexScale?: boolean;
  /** Thickness factors are bounded to 1 ± this (default 0.5, i.e. ±50 %). */
  maxThicknessErrorFraction?: number;
  /** Index factors are bounded to 1 ± this (default 0.2). */
  maxIndexErrorFraction?: number;
  maxIterations?: number;
}

/** Result of {@link fitAsBuilt}. */
export interface FitResult {
  /** Per layer (deposition order): fitted / nominal − 1, in percent. */
  thicknessErrorsPct: number[];
  /** Per layer material: fitted factor on N (1 when not fitted). */
  indexScale: Record<string, number>;
  /** RMS of fitted − measured, in percent. */
  residualRms: number;
  /** Model spectrum of the fitted stack at the measurement wavelengths, in percent. */
  fittedSpectrum: number[];
  /** The design with the fitted thicknesses (index scales are reported, not written into materials). */
  design: Design;
  iterations: number;
}

function validateMeasurement(m: Measurement): void {
  if (!Array.isArray(m.wavelengths) || m.wavelengths.length < 2) {
    throw new RangeError(
      `measurement.wavelengths: expected at least 2 wavelengths, got ${Array.isArray(m.wavelengths) ? m.wavelengths.length : typeof m.wavelengths}`,
    );
  }
  if (!Array.isArray(m.values) || m.values.length !== m.wavelengths.length) {
    throw new RangeError(
      `measurement.values: expected ${m.wavelengths.length} values, got ${Array.isArray(m.values) ? m.values.length : typeof m.values}`,
    );
  }
  m.wavelengths.forEach((w, i) => {
    if (!(w > 0) || !Number.isFinite(w))
      throw new RangeError(`measurement.wavelengths[${i}]: expected a positive wavelength in nm, got ${w}`);
  });
  m.values.forEach((v, i) => {
    if (!Number.isFinite(v))
      throw new RangeError(`measurement.values[${i}]: expected a finite percentage, got ${v}`);
  });
  if (m.quantity !== "R" && m.quantity !== "T")
    throw new RangeError(`measurement.quantity: expected "R" or "T", got ${String(m.quantity)}`);
}

/**
 * Unregularised per-layer fit of one spectrum, kept for refinement checks. For measured parts use
 * {@link fitBuiltPart} (studies/asbuilt): this one reports no uncertainty and cannot say which layers the
 * measurement does not determine.
 *
 * Reverse-engineer a built coating: fit per-layer thickness factors (and optionally one index factor per
 * material) so that the model R or T (percent) matches a measured spectrum, by bounded Levenberg–Marquardt
 * from the nominal design. Layers of zero nominal thickness are left out. Residuals: model − measured, in percent.
 */
export function fitAsBuilt(design: Design, measurement: Measurement, options: FitOptions = {}): FitResult {
  validateMeasurement(measurement);
  const evaluator = createStackEvaluator(design, {
    wavelengths: Float64Array.from(measurement.wavelengths),
    angleDeg: measurement.angleDeg,
    polarization: measurement.polarization,
  });
  const L = evaluator.layerCount;
  const nominal = Float64Array.from(evaluator.nominalThicknesses);
  const layerIdx = Array.from({ length: L }, (_, i) => i).filter((i) => (nominal[i] as number) > 0);
  const materials = options.fitIndexScale ? [...new Set(design.layers.map((l) => l.material))].sort() : [];
  const materialOf = design.layers.map((l) => materials.indexOf(l.material));
  const nT = layerIdx.length;
  const nP = nT + materials.length;
  const dT = options.maxThicknessErrorFraction ?? 0.5;
  const dN = options.maxIndexErrorFraction ?? 0.2;
  const lower = new Float64Array(nP);
  const upper = new Float64Array(nP);
  for (let k = 0; k < nP; k++) {
    const d = k < nT ? dT : dN;
    lower[k] = 1 - d;
    upper[k] = 1 + d;
  }
  const thick = Float64Array.from(nominal);
  const scale = new Float64Array(L).fill(1);
  const out = {
    R: new Float64Array(measurement.wavelengths.length),
    T: new Float64Array(measurement.wavelengths.length),
    A: new Float64Array(measurement.wavelengths.length),
  };
  const target = Float64Array.from(measurement.values);
  const model = (x: Float64Array): Float64Array => {
    for (let k = 0; k < nT; k++) {
      const j = layerIdx[k] as number;
      thick[j] = (nominal[j] as number) * (x[k] as number);
    }
    if (materials.length > 0)
      for (let j = 0; j < L; j++) scale[j] = x[nT + (materialOf[j] as number)] as number;
    evaluator.evaluate(thick, out, materials.length > 0 ? scale : undefined);
    return measurement.quantity === "R" ? out.R : out.T;
  };
  const fit = levenbergMarquardt(
    {
      parameterCount: nP,
      residualCount: target.length,
      lower,
      upper,
      steps: new Float64Array(nP).fill(1e-6),
      residuals(x, res) {
        const q = model(x);
        for (let i = 0; i < res.length; i++) res[i] = (q[i] as number) * 100 - (target[i] as number);
      },
    },
    new Float64Array(nP).fill(1),
    { maxIterations: options.maxIterations ?? 100, relativeTolerance: 1e-12 },
  );
  const q = model(fit.x);
  const fittedSpectrum = Array.from(q, (v) => v * 100);
  const thicknessErrorsPct = Array.from({ length: L }, () => 0);
  layerIdx.forEach((j, k) => (thicknessErrorsPct[j] = ((fit.x[k] as number) - 1) * 100));
  const indexScale: Record<string, number> = {};
  for (const m of new Set(design.layers.map((l) => l.material))) {
    const k = materials.indexOf(m);
    indexScale[m] = k >= 0 ? (fit.x[nT + k] as number) : 1;
  }
  return {
    thicknessErrorsPct,
    indexScale,
    residualRms: Math.sqrt(fit.cost / target.length),
    fittedSpectrum,
    design: withThicknesses(design, thick),
    iterations: fit.iterations,
  };
}
