import { createStackEvaluator, type Design } from "../../core/index.ts";
import type { Polarization } from "../spec.ts";

/**
 * One measured spectrum of a built part. Values in percent (0–100) at vacuum wavelengths in nm,
 * strictly increasing. `uncertaintyPct` is the 1σ measurement uncertainty in percentage points (the
 * weight of this measurement in a joint fit is 1/uncertainty²); default {@link DEFAULT_UNCERTAINTY_PCT}.
 */
export interface MeasuredSpectrum {
  wavelengths: ArrayLike<number>;
  values: ArrayLike<number>;
  quantity: "R" | "T";
  /** angle of incidence in the incident medium, degrees, [0, 90) */
  angleDeg: number;
  polarization: Polarization;
  /** 1σ, percentage points */
  uncertaintyPct?: number;
  label?: string;
}

/** Default 1σ uncertainty of a spectrophotometer reading, percentage points (common practice, no source). */
export const DEFAULT_UNCERTAINTY_PCT = 0.2;

/** Validate a measurement; throws a RangeError naming the field (prefixed by `where`) and the value. */
export function validateMeasured(m: MeasuredSpectrum, where: string): void {
  const n = m.wavelengths?.length ?? 0;
  if (n < 2) throw new RangeError(`${where}.wavelengths: expected at least 2 wavelengths, got ${n}`);
  if (m.values?.length !== n)
    throw new RangeError(`${where}.values: expected ${n} values, got ${m.values?.length ?? typeof m.values}`);
  for (let i = 0; i < n; i++) {
    const w = m.wavelengths[i] as number;
    if (!(w > 0) || !Number.isFinite(w))
      throw new RangeError(`${where}.wavelengths[${i}]: expected a positive wavelength in nm, got ${w}`);
    if (i > 0 && !(w > (m.wavelengths[i - 1] as number)))
      throw new RangeError(`${where}.wavelengths[${i}]: expected strictly increasing wavelengths, got ${w}`);
    const v = m.values[i] as number;
    if (!Number.isFinite(v))
      throw new RangeError(`${where}.values[${i}]: expected a finite percentage, got ${v}`);
  }
  if (m.quantity !== "R" && m.quantity !== "T")
    throw new RangeError(`${where}.quantity: expected "R" or "T", got ${String(m.quantity)}`);
  if (!(m.angleDeg >= 0 && m.angleDeg < 90))
    throw new RangeError(`${where}.angleDeg: expected 0 ≤ angle < 90 degrees, got ${m.angleDeg}`);
  if (m.polarization !== "s" && m.polarization !== "p" && m.polarization !== "u")
    throw new RangeError(`${where}.polarization: expected "s", "p" or "u", got ${String(m.polarization)}`);
  const u = m.uncertaintyPct;
  if (u !== undefined && (!(u > 0) || !Number.isFinite(u)))
    throw new RangeError(
      `${where}.uncertaintyPct: expected a positive number of percentage points, got ${u}`,
    );
}

/**
 * The design's model values (percent) at a measurement's wavelengths, angle (degrees), polarization and quantity
 * (R or T): what a chart draws beside the measured curve. Throws the engine's RangeError when the design cannot be
 * evaluated there (e.g. a table that does not cover the wavelengths).
 */
export function modelAtMeasurement(
  design: Design,
  m: Pick<MeasuredSpectrum, "wavelengths" | "quantity" | "angleDeg" | "polarization">,
): number[] {
  const ev = createStackEvaluator(design, {
    wavelengths: m.wavelengths,
    angleDeg: m.angleDeg,
    polarization: m.polarization,
  });
  const n = m.wavelengths.length;
  const out = { R: new Float64Array(n), T: new Float64Array(n), A: new Float64Array(n) };
  ev.evaluate(ev.nominalThicknesses, out);
  return Array.from(m.quantity === "R" ? out.R : out.T, (v) => v * 100);
}
