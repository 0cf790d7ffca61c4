import { z } from "zod";
import { createStackEvaluator } from "../core/index.ts";
import type { Design } from "../core/index.ts";
import { parseWith } from "./validate.ts";

/** Quantities a spec band can constrain: R, T, A in percent, OD = −log10(T) in optical-density units. */
export type SpecQuantity = "R" | "T" | "A" | "OD";
export type Polarization = "s" | "p" | "u";
export type Requirement = "min" | "max" | "avgMin" | "avgMax";

/** Default sampling step of a band when `step` is not given (nm). */
export const DEFAULT_BAND_STEP_NM = 1;
/** With the default step a band is capped at this many evenly spaced points. */
export const DEFAULT_BAND_MAX_POINTS = 501;
/** Hard cap on the number of samples of one band (explicit step). */
export const MAX_BAND_POINTS = 20001;
/** Transmittance floor used for OD = −log10(max(T, T_FLOOR)): OD is capped at 30. */
export const OD_TRANSMITTANCE_FLOOR = 1e-30;

/**
 * One band of a specification. Wavelengths in nm, angle of incidence in degrees in the incident
 * medium. `value` and `tolerance` are in percent for R/T/A and in OD units for OD; the tolerance
 * relaxes the limit (a `min` limit becomes value − tolerance, a `max` limit value + tolerance).
 */
export const SpecBandSchema = z
  .object({
    id: z.string().min(1),
    label: z.string().optional(),
    start: z.number().positive().finite(),
    stop: z.number().positive().finite(),
    step: z.number().positive().finite().optional(),
    quantity: z.enum(["R", "T", "A", "OD"]),
    polarization: z.enum(["s", "p", "u"]),
    angleDeg: z.number().min(0).lt(90),
    requirement: z.enum(["min", "max", "avgMin", "avgMax"]),
    value: z.number().finite(),
    tolerance: z.number().min(0).finite().optional(),
  })
  .superRefine((band, ctx) => {
    if (band.stop < band.start) {
      ctx.addIssue({
        code: "custom",
        path: ["stop"],
        input: band.stop,
        message: `stop must be ≥ start (${band.start} nm)`,
      });
    }
    if (band.step !== undefined && (band.stop - band.start) / band.step + 1 > MAX_BAND_POINTS) {
      ctx.addIssue({
        code: "custom",
        path: ["step"],
        input: band.step,
        message: `step gives more than ${MAX_BAND_POINTS} samples over ${band.start}–${band.stop} nm`,
      });
    }
  });
export type SpecBand = z.output<typeof SpecBandSchema>;

/** A specification: every band must pass. `protective` marks eye or sensor protection filters. */
export const SpecMaskSchema = z
  .object({
    bands: z.array(SpecBandSchema).min(1),
    protective: z.boolean().optional(),
  })
  .superRefine((mask, ctx) => {
    const seen = new Set<string>();
    mask.bands.forEach((band, i) => {
      if (seen.has(band.id)) {
        ctx.addIssue({
          code: "custom",
          path: ["bands", i, "id"],
          input: band.id,
          message: "duplicate band id",
        });
      }
      seen.add(band.id);
    });
  });
export type SpecMask = z.output<typeof SpecMaskSchema>;

/** Validate a spec mask; throws a RangeError naming the field and value on bad input. */
export function parseSpecMask(input: unknown): SpecMask {
  return parseWith(SpecMaskSchema, input, "mask");
}

/** Caution attached to every result computed for a protective specification. */
export const PROTECTIVE_CAUTION =
  "This specification protects eyes or sensors. A computed result is not a certification: protective " +
  "equipment must be tested to the applicable local standards by qualified people.";

/** Outcome of one band: margin in the band's units (percent or OD), positive = inside the limit. */
export interface BandOutcome {
  id: string;
  pass: boolean;
  /** The sample closest to (or furthest past) the limit: lowest value for min bands, highest for max bands. */
  worst: { wavelength: number; value: number };
  margin: number;
  /** Band average of the quantity (mean over the band's samples). */
  average: number;
}

/** Result of {@link evaluateSpec}. */
export interface SpecResult {
  pass: boolean;
  bands: BandOutcome[];
  /** Merit: Σ over bands of the mean squared violation (see {@link createSpecEvaluator}); 0 = all pass. */
  merit: number;
  cautions: string[];
  /** Notes from material tabulation (for example n, k held beyond the end of a table). */
  warnings: string[];
}

/**
 * Sample wavelengths of a band (nm): start, start + step, ..., and always stop. Without a step the band is
 * sampled every {@link DEFAULT_BAND_STEP_NM} nm, or at {@link DEFAULT_BAND_MAX_POINTS} evenly spaced points
 * when that would be more.
 */
export function bandWavelengths(band: Pick<SpecBand, "start" | "stop" | "step">): number[] {
  const { start, stop } = band;
  if (stop === start) return [start];
  const span = stop - start;
  if (band.step === undefined) {
    const points = Math.min(DEFAULT_BAND_MAX_POINTS, Math.floor(span / DEFAULT_BAND_STEP_NM + 1e-9) + 1);
    if (points === DEFAULT_BAND_MAX_POINTS) {
      return Array.from({ length: points }, (_, k) =>
        k === points - 1 ? stop : start + (span * k) / (points - 1),
      );
    }
  }
  const step = band.step ?? DEFAULT_BAND_STEP_NM;
  const out: number[] = [];
  const n = Math.floor(span / step + 1e-9);
  for (let k = 0; k <= n; k++) out.push(start + k * step);
  if (stop - (out[out.length - 1] ?? start) > 1e-9 * Math.max(1, stop)) out.push(stop);
  return out;
}

/** Convert a fraction triple to a band value: percent for R/T/A, OD = −log10 T. */
export function quantityValue(quantity: SpecQuantity, R: number, T: number, A: number): number {
  switch (quantity) {
    case "R":
      return R * 100;
    case "T":
      return T * 100;
    case "A":
      return A * 100;
    case "OD":
      return -Math.log10(T > OD_TRANSMITTANCE_FLOOR ? T : OD_TRANSMITTANCE_FLOOR);
  }
}

/** The effective limit of a band: value ∓ tolerance (the tolerance always relaxes). */
export function bandLimit(band: Pick<SpecBand, "requirement" | "value" | "tolerance">): number {
  const tol = band.tolerance ?? 0;
  return band.requirement === "min" || band.requirement === "avgMin" ? band.value - tol : band.value + tol;
}

/** A band compiled against one evaluator group. */
export interface BandPlan {
  id: string;
  band: SpecBand;
  group: number;
  /** Indices of the band's samples in the group's wavelength array. */
  indices: Int32Array;
  wavelengths: number[];
  limit: number;
  /** Number of residuals this band contributes to {@link SpecEvaluator.residuals}. */
  residualCount: number;
}

/** Evaluator group: one fast stack evaluator per (angle, polarization) over the union of its bands' samples. */
export interface GroupPlan {
  angleDeg: number;
  polarization: Polarization;
  wavelengths: Float64Array;
  R: Float64Array;
  T: Float64Array;
  A: Float64Array;
}

/** Precompiled spec mask evaluation for one design's layer structure. */
export interface SpecEvaluator {
  readonly layerCount: number;
  readonly nominalThicknesses: Float64Array;
  readonly bands: readonly BandPlan[];
  readonly groups: readonly GroupPlan[];
  /** Total residual count of {@link SpecEvaluator.residuals}. */
  readonly residualCount: number;
  /** Notes from the core evaluators (for example clamped table values), without duplicates. */
  readonly warnings: readonly string[];
  /** Compute all group spectra for the given thicknesses (nm, deposition order) and per-layer N factors. */
  compute(thicknesses: Float64Array, indexScale?: Float64Array): void;
  /** Full band outcomes (allocates only the result). */
  evaluate(thicknesses: Float64Array, indexScale?: Float64Array): BandOutcome[];
  /** Margins per band into `out` (no allocation); returns true when every band passes. */
  margins(thicknesses: Float64Array, out: Float64Array, indexScale?: Float64Array): boolean;
  /**
   * Residuals whose sum of squares is the merit (no allocation). Limits are moved inward by
   * `marginGoal` (band units) so that refinement aims for that much margin.
   */
  residuals(
    thicknesses: Float64Array,
    out: Float64Array,
    marginGoal?: number,
    indexScale?: Float64Array,
    offset?: number,
  ): void;
  /** Values of band `b` (band units) at its samples from the last {@link SpecEvaluator.compute}, into `out`. */
  bandValues(b: number, out: Float64Array): void;
}

const wavelengthKey = (w: number): number => Math.round(w * 1e6);

/**
 * Compile a spec mask against a design. Bands are grouped by (angleDeg, polarization) so that each
 * group needs one {@link createStackEvaluator} over the union of its bands' sample wavelengths.
 *
 * Margin (band units, positive = inside): min: min(v) − limit; max: limit − max(v);
 * avgMin: mean(v) − limit; avgMax: limit − mean(v); limit = value ∓ tolerance. A band passes when margin ≥ 0.
 *
 * Merit = Σ_bands (1/N_b) Σ_k max(0, violation_k)², where for min/max bands violation_k is how far
 * sample k lies past the limit (N_b = number of samples) and for average bands it is how far the
 * average lies past the limit (N_b = 1). Units: percent² (OD² for OD bands). The merit is 0 exactly
 * when every band passes and grows quadratically with the violation.
 */
export function createSpecEvaluator(design: Design, maskInput: SpecMask): SpecEvaluator {
  const mask = parseSpecMask(maskInput);
  const groupKeys: string[] = [];
  const groupBands: number[][] = [];
  const bandSamples = mask.bands.map((band) => bandWavelengths(band));
  mask.bands.forEach((band, b) => {
    const key = `${band.angleDeg}|${band.polarization}`;
    let g = groupKeys.indexOf(key);
    if (g < 0) {
      g = groupKeys.length;
      groupKeys.push(key);
      groupBands.push([]);
    }
    groupBands[g]?.push(b);
  });

  const bands: BandPlan[] = new Array<BandPlan>(mask.bands.length);
  const groups: GroupPlan[] = [];
  const evaluators: ReturnType<typeof createStackEvaluator>[] = [];
  groupBands.forEach((members, g) => {
    const first = mask.bands[members[0] ?? 0];
    if (!first) return;
    const unique = new Map<number, number>();
    for (const b of members)
      for (const w of bandSamples[b] ?? [])
        if (!unique.has(wavelengthKey(w))) unique.set(wavelengthKey(w), w);
    const wl = Float64Array.from([...unique.values()].sort((a, c) => a - c));
    const position = new Map<number, number>();
    wl.forEach((w, i) => position.set(wavelengthKey(w), i));
    const evaluator = createStackEvaluator(design, {
      wavelengths: wl,
      angleDeg: first.angleDeg,
      polarization: first.polarization,
    });
    evaluators.push(evaluator);
    groups.push({
      angleDeg: first.angleDeg,
      polarization: first.polarization,
      wavelengths: wl,
      R: new Float64Array(wl.length),
      T: new Float64Array(wl.length),
      A: new Float64Array(wl.length),
    });
    for (const b of members) {
      const band = mask.bands[b];
      const samples = bandSamples[b];
      if (!band || !samples) continue;
      const avg = band.requirement === "avgMin" || band.requirement === "avgMax";
      bands[b] = {
        id: band.id,
        band,
        group: g,
        indices: Int32Array.from(samples, (w) => position.get(wavelengthKey(w)) ?? 0),
        wavelengths: samples,
        limit: bandLimit(band),
        residualCount: avg ? 1 : samples.length,
      };
    }
  });

  const first = evaluators[0];
  if (!first) throw new RangeError("mask.bands: no bands to evaluate");
  const layerCount = first.layerCount;
  const nominalThicknesses = Float64Array.from(first.nominalThicknesses);
  const residualCount = bands.reduce((s, b) => s + b.residualCount, 0);
  const warnings = [...new Set(evaluators.flatMap((e) => e.warnings))];

  const compute = (thicknesses: Float64Array, indexScale?: Float64Array): void => {
    if (thicknesses.length !== layerCount) {
      throw new RangeError(`thicknesses: expected ${layerCount} layers, got ${thicknesses.length}`);
    }
    for (let g = 0; g < groups.length; g++) {
      const group = groups[g] as GroupPlan;
      (evaluators[g] as (typeof evaluators)[number]).evaluate(thicknesses, group, indexScale);
    }
  };

  // Scan one band of the last computation: fills scan.{worstIndex, worstValue, mean}.
  const scan = { worstIndex: 0, worstValue: 0, mean: 0 };
  const scanBand = (plan: BandPlan): void => {
    const group = groups[plan.group] as GroupPlan;
    const q = plan.band.quantity;
    const wantLow = plan.band.requirement === "min" || plan.band.requirement === "avgMin";
    let worst = wantLow ? Infinity : -Infinity;
    let worstIndex = 0;
    let sum = 0;
    const idx = plan.indices;
    for (let k = 0; k < idx.length; k++) {
      const i = idx[k] as number;
      const v = quantityValue(q, group.R[i] as number, group.T[i] as number, group.A[i] as number);
      sum += v;
      if (wantLow ? v < worst : v > worst) {
        worst = v;
        worstIndex = k;
      }
    }
    scan.worstIndex = worstIndex;
    scan.worstValue = worst;
    scan.mean = sum / idx.length;
  };
  const marginOf = (plan: BandPlan): number => {
    switch (plan.band.requirement) {
      case "min":
        return scan.worstValue - plan.limit;
      case "max":
        return plan.limit - scan.worstValue;
      case "avgMin":
        return scan.mean - plan.limit;
      case "avgMax":
        return plan.limit - scan.mean;
    }
  };

  return {
    layerCount,
    nominalThicknesses,
    bands,
    groups,
    residualCount,
    warnings,
    compute,
    evaluate(thicknesses, indexScale) {
      compute(thicknesses, indexScale);
      return bands.map((plan) => {
        scanBand(plan);
        const margin = marginOf(plan);
        return {
          id: plan.id,
          pass: margin >= 0,
          worst: { wavelength: plan.wavelengths[scan.worstIndex] as number, value: scan.worstValue },
          margin,
          average: scan.mean,
        };
      });
    },
    margins(thicknesses, out, indexScale) {
      compute(thicknesses, indexScale);
      let pass = true;
      for (let b = 0; b < bands.length; b++) {
        scanBand(bands[b] as BandPlan);
        const m = marginOf(bands[b] as BandPlan);
        out[b] = m;
        if (!(m >= 0)) pass = false;
      }
      return pass;
    },
    residuals(thicknesses, out, marginGoal = 0, indexScale, offset = 0) {
      compute(thicknesses, indexScale);
      let r = offset;
      for (const plan of bands) {
        const group = groups[plan.group] as GroupPlan;
        const q = plan.band.quantity;
        const req = plan.band.requirement;
        const idx = plan.indices;
        if (req === "avgMin" || req === "avgMax") {
          let sum = 0;
          for (let k = 0; k < idx.length; k++) {
            const i = idx[k] as number;
            sum += quantityValue(q, group.R[i] as number, group.T[i] as number, group.A[i] as number);
          }
          const mean = sum / idx.length;
          const v = req === "avgMin" ? plan.limit + marginGoal - mean : mean - (plan.limit - marginGoal);
          out[r++] = v > 0 ? v : 0;
          continue;
        }
        const w = 1 / Math.sqrt(idx.length);
        const low = req === "min";
        for (let k = 0; k < idx.length; k++) {
          const i = idx[k] as number;
          const value = quantityValue(q, group.R[i] as number, group.T[i] as number, group.A[i] as number);
          const v = low ? plan.limit + marginGoal - value : value - (plan.limit - marginGoal);
          out[r++] = v > 0 ? v * w : 0;
        }
      }
    },
    bandValues(b, out) {
      const plan = bands[b];
      if (!plan) throw new RangeError(`band index ${b} out of range`);
      const group = groups[plan.group] as GroupPlan;
      const idx = plan.indices;
      for (let k = 0; k < idx.length; k++) {
        const i = idx[k] as number;
        out[k] = quantityValue(
          plan.band.quantity,
          group.R[i] as number,
          group.T[i] as number,
          group.A[i] as number,
        );
      }
    },
  };
}

/** Sum of squares of a residual vector (the merit when produced by {@link SpecEvaluator.residuals}). */
export function sumOfSquares(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += (r[i] as number) * (r[i] as number);
  return s;
}

/** Merit of the last-evaluable state for given thicknesses (allocates one residual buffer). */
export function meritOf(
  evaluator: SpecEvaluator,
  thicknesses: Float64Array,
  indexScale?: Float64Array,
): number {
  const r = new Float64Array(evaluator.residualCount);
  evaluator.residuals(thicknesses, r, 0, indexScale);
  return sumOfSquares(r);
}

/**
 * Evaluate a design's nominal performance against a spec mask. See {@link createSpecEvaluator} for the
 * margin and merit definitions. Protective masks add {@link PROTECTIVE_CAUTION} to `cautions`.
 */
export function evaluateSpec(design: Design, maskInput: SpecMask): SpecResult {
  const evaluator = createSpecEvaluator(design, maskInput);
  const t = evaluator.nominalThicknesses;
  const bands = evaluator.evaluate(t);
  const merit = meritOf(evaluator, t);
  return {
    pass: bands.every((b) => b.pass),
    bands,
    merit,
    cautions: maskInput.protective ? [PROTECTIVE_CAUTION] : [],
    warnings: [...evaluator.warnings],
  };
}

/**
 * Evaluate one band on a tabulated spectrum (for example a measurement): `wavelengths` in nm, strictly
 * increasing; `values` in the band's units (percent for R/T/A, OD for OD). The spectrum is interpolated
 * linearly onto the band's samples; a band reaching outside the table is refused (RangeError), never
 * extrapolated. Margin and worst point as in {@link createSpecEvaluator}.
 */
export function evaluateBandOnArrays(
  bandInput: SpecBand,
  wavelengths: ArrayLike<number>,
  values: ArrayLike<number>,
): BandOutcome {
  const band = parseWith(SpecBandSchema, bandInput, "band");
  const n = wavelengths.length;
  if (n < 1 || values.length !== n) {
    throw new RangeError(`values: expected ${n} values matching the wavelengths, got ${values.length}`);
  }
  for (let i = 0; i < n; i++) {
    const w = wavelengths[i] as number;
    if (!Number.isFinite(w) || (i > 0 && !(w > (wavelengths[i - 1] as number)))) {
      throw new RangeError(`wavelengths[${i}]: expected strictly increasing wavelengths in nm, got ${w}`);
    }
    if (!Number.isFinite(values[i] as number))
      throw new RangeError(`values[${i}]: expected a finite number, got ${values[i]}`);
  }
  const lo = wavelengths[0] as number;
  const hi = wavelengths[n - 1] as number;
  if (band.start < lo || band.stop > hi) {
    throw new RangeError(
      `band ${band.id}: ${band.start}–${band.stop} nm reaches outside the spectrum (${lo}–${hi} nm); not extrapolated`,
    );
  }
  const samples = bandWavelengths(band);
  const limit = bandLimit(band);
  const wantLow = band.requirement === "min" || band.requirement === "avgMin";
  let j = 0;
  let sum = 0;
  let worst = wantLow ? Infinity : -Infinity;
  let worstAt = samples[0] as number;
  for (const w of samples) {
    while (j < n - 2 && (wavelengths[j + 1] as number) < w) j++;
    const w0 = wavelengths[j] as number;
    const w1 = n > 1 ? (wavelengths[j + 1] as number) : w0;
    const v0 = values[j] as number;
    const v1 = n > 1 ? (values[j + 1] as number) : v0;
    const v = w1 === w0 ? v0 : v0 + ((v1 - v0) * (w - w0)) / (w1 - w0);
    sum += v;
    if (wantLow ? v < worst : v > worst) {
      worst = v;
      worstAt = w;
    }
  }
  const mean = sum / samples.length;
  const margin =
    band.requirement === "min"
      ? worst - limit
      : band.requirement === "max"
        ? limit - worst
        : band.requirement === "avgMin"
          ? mean - limit
          : limit - mean;
  return {
    id: band.id,
    pass: margin >= 0,
    worst: { wavelength: worstAt, value: worst },
    margin,
    average: mean,
  };
}
