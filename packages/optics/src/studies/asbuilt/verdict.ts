/**
 * Verdicts of measured parts against a spec mask, with a measurement-uncertainty guard band, and the
 * actual yield of a lot with its Wilson interval.
 *
 * Guard band (ISO 14253-1 "conformance zone" idea; common practice in inspection, no single source here):
 * a band passes only when its margin exceeds k · u, with u the 1σ measurement uncertainty of the value
 * the margin is taken on (percentage points; for OD propagated as u / (ln 10 · T)) and k the coverage
 * factor (default 2). A part exactly at the limit therefore fails whenever u > 0.
 *
 * Colour requirements are judged on a measurement of their quantity, angle and polarization that covers at
 * least 430–700 nm (colourOfSpectrum; ends held to 380–780 nm). Their guard is the margin lost when the whole
 * measured spectrum is moved by ±k·u percentage points (a fully correlated photometric error; common
 * practice, no source), in the limit's own units.
 */
import { colourOfSpectrum, judgeColour } from "../../core/index.ts";
import {
  evaluateBandOnArrays,
  parseSpecMask,
  PROTECTIVE_CAUTION,
  type SpecBand,
  type SpecColour,
  type SpecMask,
  type SpecMaskInput,
} from "../spec.ts";
import { wilsonInterval, type ProportionInterval } from "../wilson.ts";
import { DEFAULT_UNCERTAINTY_PCT, validateMeasured, type MeasuredSpectrum } from "./measurement.ts";

/** Default coverage factor of the guard band (k = 2, about 95 % for a normal error). */
export const DEFAULT_GUARD_K = 2;

/** A measured part: its id and its spectra. */
export interface MeasuredPart {
  id: string;
  measurements: MeasuredSpectrum[];
}

/** Verdict of one band (or colour requirement) of one part. */
export interface PartBandVerdict {
  /** the band's id, or the colour requirement's */
  bandId: string;
  /** "not-measured": no spectrum of this quantity, angle and polarization covers the band */
  status: "pass" | "fail" | "not-measured";
  /** margin without the guard band, in the band's units (percent or OD); null when not measured */
  margin: number | null;
  /** margin − k·u; the band passes when this is > 0, or ≥ 0 when u = 0 */
  guardedMargin: number | null;
  /** k·u in the band's units */
  guard: number | null;
  /** for a colour requirement: wavelength NaN and the deciding coordinate's value */
  worst: { wavelength: number; value: number } | null;
  /** index of the measurement used */
  measurement: number | null;
}

/** Verdict of one part. */
export interface PartVerdict {
  partId: string;
  /** "incomplete": some band not measured and no measured band failed */
  status: "pass" | "fail" | "incomplete";
  bands: PartBandVerdict[];
}

function coversColour(c: SpecColour, m: MeasuredSpectrum): boolean {
  if (c.quantity !== m.quantity || c.polarization !== m.polarization) return false;
  if (Math.abs(c.angleDeg - m.angleDeg) > 1e-6) return false;
  return (m.wavelengths[0] as number) <= 430 && (m.wavelengths[m.wavelengths.length - 1] as number) >= 700;
}

function colourVerdict(c: SpecColour, part: MeasuredPart, k: number): PartBandVerdict {
  const idx = part.measurements.findIndex((m) => coversColour(c, m));
  if (idx < 0)
    return {
      bandId: c.id,
      status: "not-measured",
      margin: null,
      guardedMargin: null,
      guard: null,
      worst: null,
      measurement: null,
    };
  const m = part.measurements[idx]!;
  const u = m.uncertaintyPct ?? DEFAULT_UNCERTAINTY_PCT;
  const judge = (shift: number) => {
    const values = Array.from(m.values, (v) => Math.min(1, Math.max(0, (v + shift) / 100)));
    return judgeColour(
      c.limit,
      colourOfSpectrum(m.wavelengths, values, { illuminant: c.illuminant, observer: c.observer }),
    );
  };
  const j = judge(0);
  const lowest = Math.min(j.margin, judge(k * u).margin, judge(-k * u).margin);
  const guard = Number.isFinite(lowest) ? j.margin - lowest : Number.NaN;
  const guarded = j.margin - guard;
  const pass = guard > 0 ? guarded > 0 : guarded >= 0;
  return {
    bandId: c.id,
    status: pass ? "pass" : "fail",
    margin: j.margin,
    guardedMargin: guarded,
    guard,
    worst: { wavelength: Number.NaN, value: j.value },
    measurement: idx,
  };
}

function matches(band: SpecBand, m: MeasuredSpectrum): boolean {
  const q = band.quantity === "OD" ? "T" : band.quantity;
  if (q !== m.quantity) return false;
  if (Math.abs(band.angleDeg - m.angleDeg) > 1e-6) return false;
  if (band.polarization !== m.polarization) return false;
  const n = m.wavelengths.length;
  return band.start >= (m.wavelengths[0] as number) && band.stop <= (m.wavelengths[n - 1] as number);
}

/**
 * Verdict of one measured part against `mask`: per band, the first measurement of the band's quantity
 * (T for OD), angle (to 1e-6°) and polarization that covers its range is evaluated by linear
 * interpolation (A cannot be measured directly and is reported "not-measured").
 * @param k guard-band coverage factor (≥ 0; 0 switches the guard band off)
 */
export function partVerdict(
  maskInput: SpecMaskInput,
  part: MeasuredPart,
  k: number = DEFAULT_GUARD_K,
): PartVerdict {
  const mask = parseSpecMask(maskInput);
  if (!(k >= 0) || !Number.isFinite(k)) throw new RangeError(`guard k: expected a number ≥ 0, got ${k}`);
  if (typeof part?.id !== "string" || part.id === "")
    throw new RangeError(`part.id: expected a non-empty string, got ${String(part?.id)}`);
  part.measurements.forEach((m, i) => validateMeasured(m, `part ${part.id}.measurements[${i}]`));
  const bands = mask.bands.map((band): PartBandVerdict => {
    const idx = part.measurements.findIndex((m) => matches(band, m));
    if (idx < 0)
      return {
        bandId: band.id,
        status: "not-measured",
        margin: null,
        guardedMargin: null,
        guard: null,
        worst: null,
        measurement: null,
      };
    const m = part.measurements[idx]!;
    const u = m.uncertaintyPct ?? DEFAULT_UNCERTAINTY_PCT;
    let values: ArrayLike<number> = m.values;
    if (band.quantity === "OD") values = Array.from(m.values, (v) => -Math.log10(Math.max(v / 100, 1e-30)));
    const out = evaluateBandOnArrays(band, m.wavelengths, values);
    let guard = k * u;
    if (band.quantity === "OD") {
      // the OD value's uncertainty at the value the margin is taken on
      const t = Math.max(10 ** -out.worst.value, 1e-30);
      guard = (k * (u / 100)) / (Math.LN10 * t);
    }
    const guarded = out.margin - guard;
    const pass = guard > 0 ? guarded > 0 : guarded >= 0;
    return {
      bandId: band.id,
      status: pass ? "pass" : "fail",
      margin: out.margin,
      guardedMargin: guarded,
      guard,
      worst: out.worst,
      measurement: idx,
    };
  });
  for (const c of mask.colour ?? []) bands.push(colourVerdict(c, part, k));
  const status = bands.some((b) => b.status === "fail")
    ? "fail"
    : bands.some((b) => b.status === "not-measured")
      ? "incomplete"
      : "pass";
  return { partId: part.id, status, bands };
}

/** Actual yield of a lot. */
export interface LotYield {
  parts: number;
  /** parts with a complete verdict (pass or fail) */
  evaluated: number;
  passed: number;
  /** passed / evaluated; null when nothing could be evaluated */
  yield: number | null;
  interval: ProportionInterval | null;
  /** the predicted yield of the released revision, when given, and whether its interval overlaps the actual one */
  predicted?: { yield: number; low?: number; high?: number; overlaps: boolean };
  cautions: string[];
}

/**
 * The lot's actual yield (parts that passed every band, counting only parts with a complete verdict) with
 * its 95 % Wilson interval (Wilson, JASA 22:209, 1927), next to the predicted yield when given.
 */
export function lotYield(
  verdicts: PartVerdict[],
  predicted?: { yield: number; low?: number; high?: number },
  mask?: SpecMask,
): LotYield {
  const evaluated = verdicts.filter((v) => v.status !== "incomplete");
  const passed = evaluated.filter((v) => v.status === "pass").length;
  const interval = evaluated.length > 0 ? wilsonInterval(passed, evaluated.length) : null;
  const out: LotYield = {
    parts: verdicts.length,
    evaluated: evaluated.length,
    passed,
    yield: evaluated.length > 0 ? passed / evaluated.length : null,
    interval,
    cautions: mask?.protective ? [PROTECTIVE_CAUTION] : [],
  };
  if (predicted) {
    if (!(predicted.yield >= 0 && predicted.yield <= 1))
      throw new RangeError(`predicted.yield: expected a fraction 0..1, got ${predicted.yield}`);
    const lo = predicted.low ?? predicted.yield;
    const hi = predicted.high ?? predicted.yield;
    out.predicted = { ...predicted, overlaps: interval ? lo <= interval.high && hi >= interval.low : true };
  }
  return out;
}
