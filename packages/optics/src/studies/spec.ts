import { z } from "zod";
import {
  COLOUR_WAVELENGTHS,
  ColourRequirementSchema,
  colourFailureReason,
  colourFromSamples,
  colourSwatch,
  createStackEvaluator,
  coneHalfAngleDeg,
  judgeColour,
} from "../core/index.ts";
import type {
  ColourCoordinates,
  ColourJudgement,
  ColourLimiting,
  Design,
  Illuminant,
  Observer,
} from "../core/index.ts";
import {
  ComplexBand,
  POL_CODES,
  bandConditionsText,
  conditionsText,
  isComplexBand,
} from "./spec-conditions.ts";
export { bandAngles, bandConditionsText, colourConditionsText, isComplexBand } from "./spec-conditions.ts";
import { parseWith } from "./validate.ts";

/** Quantities a spec band can constrain: R, T, A in percent, OD = −log10(T) in optical-density units. */
export type SpecQuantity = "R" | "T" | "A" | "OD";
/** Polarization of a stack evaluation: s, p, or unpolarized (mean of s and p intensities). */
export type Polarization = "s" | "p" | "u";
/** Polarization of a band: s, p, unpolarized, or "sp" = s and p each (both must pass). */
export type BandPolarization = Polarization | "sp";
export type Requirement = "min" | "max" | "avgMin" | "avgMax";

/** Default sampling step of a band when `step` is not given (nm). */
export const DEFAULT_BAND_STEP_NM = 1;
/** With the default step a band is capped at this many evenly spaced points. */
export const DEFAULT_BAND_MAX_POINTS = 501;
/** Hard cap on the number of samples of one band (explicit step). */
export const MAX_BAND_POINTS = 20001;
/** Transmittance floor used for OD = −log10(max(T, T_FLOOR)): OD is capped at 30. */
export const OD_TRANSMITTANCE_FLOOR = 1e-30;
/** Default angle step (degrees) at which an angle range is sampled before refinement. */
export const DEFAULT_ANGLE_STEP_DEG = 1;
/** Largest number of sampled angles of one angle range. */
export const MAX_ANGLE_SAMPLES = 91;
/**
 * Angle tolerance (degrees) of the worst-angle search in an angle range: after sampling, a golden-section
 * search in the two intervals around the worst sampled angle locates the worst angle to within this.
 */
export const ANGLE_RANGE_TOLERANCE_DEG = 0.05;
/** Residual (band units) that a non-finite sample contributes to the merit, so an optimizer moves away from it. */
export const NON_FINITE_PENALTY = 1000;

/** Angle range of a band, degrees in the incident medium: every angle from fromDeg to toDeg must pass. */
export const AngleRangeSchema = z
  .object({
    fromDeg: z.number().min(0).lt(90),
    toDeg: z.number().min(0).lt(90),
    /** sampling step before refinement, degrees, default 1 */
    stepDeg: z.number().positive().max(10).optional(),
  })
  .strict();

/** Cone of light: half-angle (degrees) or working f-number (half-angle arcsin(1/(2N))), about the band's angleDeg. */
export const BandConeSchema = z.union([
  z.object({ halfAngleDeg: z.number().gt(0).lt(90) }).strict(),
  z.object({ fNumber: z.number().min(0.5).max(1000) }).strict(),
]);

/**
 * One band of a specification. Wavelengths in nm, angles in degrees in the incident medium. `value` and
 * `tolerance` are in percent for R/T/A and in OD units for OD; the tolerance relaxes the limit (a `min` limit
 * becomes value − tolerance, a `max` limit value + tolerance).
 *
 * Conditions (at most one of angleRange and cone):
 * - `angleDeg` alone: one angle of incidence (default 0); with `cone`, the cone's chief-ray angle.
 * - `angleRange`: every angle from fromDeg to toDeg must pass (sampled every stepDeg, default 1°, then the
 *   worst angle is refined to {@link ANGLE_RANGE_TOLERANCE_DEG}); with `angleAverage: true` the quantity is
 *   instead averaged over the range (uniform in angle) and the requirement applies to that average.
 * - `cone`: the quantity is averaged over a cone of light (uniform in solid angle) about angleDeg.
 * - `polarization`: "s", "p", "u" (unpolarized) or "sp" (s and p each: both must pass).
 */
export const SpecBandSchema = z
  .object({
    id: z.string().min(1),
    label: z.string().optional(),
    start: z.number().positive().finite(),
    stop: z.number().positive().finite(),
    step: z.number().positive().finite().optional(),
    quantity: z.enum(["R", "T", "A", "OD"]),
    polarization: z.enum(["s", "p", "u", "sp"]),
    angleDeg: z.number().min(0).lt(90).default(0),
    angleRange: AngleRangeSchema.optional(),
    angleAverage: z.boolean().optional(),
    cone: BandConeSchema.optional(),
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
    if (band.angleRange && band.cone) {
      ctx.addIssue({
        code: "custom",
        path: ["cone"],
        input: band.cone,
        message: "a band has either an angle range or a cone, not both",
      });
    }
    if (band.angleAverage && !band.angleRange) {
      ctx.addIssue({
        code: "custom",
        path: ["angleAverage"],
        input: band.angleAverage,
        message: "angleAverage needs an angleRange",
      });
    }
    const r = band.angleRange;
    if (r) {
      if (r.toDeg < r.fromDeg) {
        ctx.addIssue({
          code: "custom",
          path: ["angleRange", "toDeg"],
          input: r.toDeg,
          message: `toDeg must be ≥ fromDeg (${r.fromDeg}°)`,
        });
      } else if (
        (r.toDeg - r.fromDeg) / (r.stepDeg ?? DEFAULT_ANGLE_STEP_DEG) + 1 >
        MAX_ANGLE_SAMPLES + 1e-9
      ) {
        ctx.addIssue({
          code: "custom",
          path: ["angleRange", "stepDeg"],
          input: r.stepDeg,
          message: `step gives more than ${MAX_ANGLE_SAMPLES} angles over ${r.fromDeg}–${r.toDeg}°`,
        });
      }
    }
    if (band.cone) {
      const half = coneHalfAngleDeg(band.cone);
      if (!(band.angleDeg + half < 90)) {
        ctx.addIssue({
          code: "custom",
          path: ["cone"],
          input: band.angleDeg,
          message: `chief ray ${band.angleDeg}° plus cone half-angle ${half.toFixed(2)}° reaches grazing incidence`,
        });
      }
    }
  });
export type SpecBand = z.output<typeof SpecBandSchema>;

/**
 * A colour requirement of a spec mask (its `colour` list): the colour of the reflected ("R") or
 * transmitted ("T") light under illuminant D65 or A, for the CIE 1931 2° or 1964 10° observer, at one
 * angle of incidence (degrees) and polarization, must lie in a box (x/y, or a* and b* with optional L*) or
 * within a ΔE*ab limit (CIE76 or CIEDE2000) of a target L*a*b* (see {@link ColourRequirementSchema};
 * CIE 015:2018). The colour is computed on 380–780 nm every 5 nm ({@link COLOUR_WAVELENGTHS}).
 * `id` is shared with the bands' ids: no band and no colour requirement may have the same one. A `kind`
 * tag is dropped (the list says what the entries are), so a stored mask has one canonical form.
 */
export const SpecColourSchema = ColourRequirementSchema.omit({ kind: true }).extend({
  id: z.string().min(1),
});
export type SpecColour = z.output<typeof SpecColourSchema>;
/** A colour requirement as written (illuminant D65, observer 2°, 0°, unpolarized when left out). */
export type SpecColourInput = z.input<typeof SpecColourSchema>;

/**
 * A specification: every band and every colour requirement must pass. `protective` marks eye or sensor
 * protection filters. `colour` is optional (masks without it keep their stored form and hash); a mask
 * needs at least one band or one colour requirement, and ids are unique across both lists.
 */
export const SpecMaskSchema = z
  .object({
    bands: z.array(SpecBandSchema),
    colour: z.array(SpecColourSchema).optional(),
    protective: z.boolean().optional(),
  })
  .superRefine((mask, ctx) => {
    if (mask.bands.length === 0 && (mask.colour ?? []).length === 0) {
      ctx.addIssue({
        code: "custom",
        path: ["bands"],
        input: mask.bands,
        message: "a mask needs at least one band or colour requirement",
      });
    }
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
    (mask.colour ?? []).forEach((c, i) => {
      if (seen.has(c.id)) {
        ctx.addIssue({
          code: "custom",
          path: ["colour", i, "id"],
          input: c.id,
          message: "duplicate id (bands and colour requirements share ids)",
        });
      }
      seen.add(c.id);
    });
  });
export type SpecMask = z.output<typeof SpecMaskSchema>;
/** A spec mask as written (angleDeg may be left out: 0). */
export type SpecMaskInput = z.input<typeof SpecMaskSchema>;
/** A spec band as written. */
export type SpecBandInput = z.input<typeof SpecBandSchema>;

/** Validate a spec mask; throws a RangeError naming the field and value on bad input. */
export function parseSpecMask(input: unknown): SpecMask {
  return parseWith(SpecMaskSchema, input, "mask");
}

/** Caution attached to every result computed for a protective specification. */
export const PROTECTIVE_CAUTION =
  "This specification protects eyes or sensors. A computed result is not a certification: protective " +
  "equipment must be tested to the applicable local standards by qualified people.";

/**
 * The worst point of a band: wavelength (nm), value (band units), angle (degrees) and polarization. For a
 * colour requirement the colour is an integral over 380–780 nm: `wavelength` is NaN and `value` is the
 * deciding coordinate (see {@link ColourOutcome.limiting}).
 */
export interface WorstPoint {
  wavelength: number;
  value: number;
  /** angle of incidence of the worst point (for a cone: the chief ray), degrees */
  angleDeg: number;
  /** polarization of the worst point ("u" = unpolarized) */
  polarization: Polarization;
}

/** The colour found for a colour requirement, and how it stands against the limit. */
export interface ColourOutcome {
  quantity: "R" | "T";
  illuminant: Illuminant;
  observer: Observer;
  /** tristimulus values, perfect reflector Y = 100 (Y is the luminous reflectance or transmittance, %) */
  X: number;
  Y: number;
  Z: number;
  /** chromaticity */
  x: number;
  y: number;
  /** CIELAB relative to the illuminant's white */
  L: number;
  a: number;
  b: number;
  /** ΔE*ab against the target (ΔE limits only) */
  deltaE?: number;
  /** the coordinate that sets the margin: nearest its box edge (or furthest past it), or ΔE */
  limiting: ColourLimiting;
  /** sRGB swatch for display (hue at full brightness, clipped to the gamut), e.g. "#f3e9ff" */
  swatch: string;
}

/**
 * Outcome of one band or colour requirement: margin in the band's units (percent or OD), positive = inside
 * the limit. For a colour requirement the margin is in the limit's units (x, y; L*, a*, b*; or ΔE), `colour`
 * holds the colour found and `average` is its Y (luminous R or T, %).
 */
export interface BandOutcome {
  id: string;
  pass: boolean;
  /** The sample closest to (or furthest past) the limit: lowest value for min bands, highest for max bands. */
  worst: WorstPoint;
  /** NaN when a computed value was not finite (then `pass` is false and `reason` says where). */
  margin: number;
  /** Band average of the quantity (mean over the band's samples). */
  average: number;
  /** Why the band fails without a margin, e.g. "the spectrum is not finite at 532 nm". */
  reason?: string;
  /** Colour requirements only: the colour found. */
  colour?: ColourOutcome;
}

/** Result of {@link evaluateSpec}. */
export interface SpecResult {
  pass: boolean;
  /** one outcome per band (mask order), then one per colour requirement (mask order) */
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

/**
 * Every wavelength (nm, sorted, without duplicates) at which a mask evaluates the design: the bands'
 * samples and, with colour requirements, 380–780 nm every 5 nm. For checking a design's physical inputs
 * before evaluation.
 */
export function maskWavelengths(maskInput: SpecMaskInput): number[] {
  const mask = parseSpecMask(maskInput);
  const all = new Set<number>();
  for (const band of mask.bands) for (const w of bandWavelengths(band)) all.add(w);
  if ((mask.colour ?? []).length > 0) for (const w of COLOUR_WAVELENGTHS) all.add(w);
  return [...all].sort((a, b) => a - b);
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
      // a NaN T must stay NaN (it would otherwise become the floor, OD 30, and pass a blocking band)
      return Number.isNaN(T)
        ? Number.NaN
        : -Math.log10(T > OD_TRANSMITTANCE_FLOOR ? T : OD_TRANSMITTANCE_FLOOR);
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

/**
 * Evaluator group: one fast stack evaluator per (angle, polarization) over the union of its bands' samples,
 * or — for a band with an angle range, a cone, or "s and p each" — the band's own group whose R, T, A hold
 * the band's curve at its conditions: per wavelength the worst over angles and polarizations (min/max
 * requirements; `angleAt`, `polAt` say where), the worst whole curve (average requirements), or the
 * cone/angle average.
 */
export interface GroupPlan {
  angleDeg: number;
  polarization: BandPolarization;
  wavelengths: Float64Array;
  R: Float64Array;
  T: Float64Array;
  A: Float64Array;
  /** per wavelength: angle (degrees) of the value held (own groups of angle-range bands) */
  angleAt?: Float64Array;
  /** per wavelength: polarization of the value held, 0 = s, 1 = p, 2 = unpolarized */
  polAt?: Uint8Array;
  /** the conditions in words, e.g. "0–10°, s and p each" */
  conditions: string;
}

/**
 * Residual scale of an x/y colour box in the merit: chromaticity is counted in hundredths, so that a
 * violation of 0.01 in x or y weighs like 1 % in R or 1 ΔE (a choice for the optimizer, no source).
 */
export const COLOUR_XY_RESIDUAL_SCALE = 100;

/** A colour requirement compiled against one evaluator group (whose wavelengths include 380–780 nm every 5 nm). */
export interface ColourPlan {
  id: string;
  colour: SpecColour;
  group: number;
  /** indices of 380, 385, …, 780 nm in the group's wavelength array */
  indices: Int32Array;
  /** factor on the margin in the merit: {@link COLOUR_XY_RESIDUAL_SCALE} for an x/y box, 1 otherwise */
  residualScale: number;
}

/** Precompiled spec mask evaluation for one design's layer structure. */
export interface SpecEvaluator {
  readonly layerCount: number;
  readonly nominalThicknesses: Float64Array;
  readonly bands: readonly BandPlan[];
  /** colour requirements, mask order */
  readonly colour: readonly ColourPlan[];
  /**
   * Ids of everything judged, in the order of {@link SpecEvaluator.evaluate} and {@link SpecEvaluator.margins}:
   * the bands (mask order), then the colour requirements (mask order).
   */
  readonly ids: readonly string[];
  readonly groups: readonly GroupPlan[];
  /** Total residual count of {@link SpecEvaluator.residuals}. */
  readonly residualCount: number;
  /** Notes from the core evaluators (for example clamped table values), without duplicates. */
  readonly warnings: readonly string[];
  /** Compute all group spectra for the given thicknesses (nm, deposition order) and per-layer N factors. */
  compute(thicknesses: Float64Array, indexScale?: Float64Array): void;
  /** Full outcomes, one per entry of {@link SpecEvaluator.ids} (allocates only the result). */
  evaluate(thicknesses: Float64Array, indexScale?: Float64Array): BandOutcome[];
  /**
   * Margins per band, then per colour requirement, into `out` (length ≥ ids.length; bands allocate nothing,
   * a colour requirement a few small objects); returns true when everything passes.
   */
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
  /**
   * Samples of band `b` outside its limit (min/max requirements) or not finite, from the last
   * {@link SpecEvaluator.compute} or {@link SpecEvaluator.evaluate}: wavelength, value, angle, polarization.
   * An index past the bands (a colour requirement) has none: [].
   */
  violations(b: number): WorstPoint[];
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
 *
 * Colour requirements join the group of their angle and polarization (its wavelengths then include
 * 380–780 nm every 5 nm); their colour is summed from that group's R or T by {@link colourFromSamples} and
 * judged by {@link judgeColour}. Margin in the limit's units (x, y; L*, a*, b*; ΔE); merit term
 * max(0, −margin · s)² with s = {@link COLOUR_XY_RESIDUAL_SCALE} for x/y boxes, 1 otherwise.
 */
export function createSpecEvaluator(design: Design, maskInput: SpecMaskInput): SpecEvaluator {
  const mask = parseSpecMask(maskInput);
  const colourList = mask.colour ?? [];
  const groupKeys: string[] = [];
  const groupBands: number[][] = [];
  const groupColours: number[][] = [];
  const groupAt: { angleDeg: number; polarization: Polarization }[] = [];
  const bandSamples = mask.bands.map((band) => bandWavelengths(band));
  const complexOf = new Map<number, number>(); // band index → own group
  const groupOf = (angleDeg: number, polarization: Polarization): number => {
    const key = `${angleDeg}|${polarization}`;
    let g = groupKeys.indexOf(key);
    if (g < 0) {
      g = groupKeys.length;
      groupKeys.push(key);
      groupBands.push([]);
      groupColours.push([]);
      groupAt.push({ angleDeg, polarization });
    }
    return g;
  };
  mask.bands.forEach((band, b) => {
    if (isComplexBand(band)) return;
    groupBands[groupOf(band.angleDeg, band.polarization as Polarization)]?.push(b);
  });
  // a colour requirement joins the simple group of its angle and polarization: the group's wavelengths
  // then include 380–780 nm every 5 nm, and the colour is summed from the group's own R or T
  colourList.forEach((c, k) => groupColours[groupOf(c.angleDeg, c.polarization)]?.push(k));

  const bands: BandPlan[] = new Array<BandPlan>(mask.bands.length);
  const colourPlans: ColourPlan[] = new Array<ColourPlan>(colourList.length);
  const groups: GroupPlan[] = [];
  const evaluators: ReturnType<typeof createStackEvaluator>[] = [];
  const plan = (band: SpecBand, g: number, indices: Int32Array, samples: number[]): BandPlan => {
    const avg = band.requirement === "avgMin" || band.requirement === "avgMax";
    return {
      id: band.id,
      band,
      group: g,
      indices,
      wavelengths: samples,
      limit: bandLimit(band),
      residualCount: avg ? 1 : samples.length,
    };
  };
  groupKeys.forEach((_, k) => {
    const members = groupBands[k] ?? [];
    const colourMembers = groupColours[k] ?? [];
    const at = groupAt[k]!;
    const unique = new Map<number, number>();
    for (const b of members)
      for (const w of bandSamples[b] ?? [])
        if (!unique.has(wavelengthKey(w))) unique.set(wavelengthKey(w), w);
    if (colourMembers.length > 0)
      for (const w of COLOUR_WAVELENGTHS) if (!unique.has(wavelengthKey(w))) unique.set(wavelengthKey(w), w);
    const wl = Float64Array.from([...unique.values()].sort((a, c) => a - c));
    const position = new Map<number, number>();
    wl.forEach((w, i) => position.set(wavelengthKey(w), i));
    const evaluator = createStackEvaluator(design, {
      wavelengths: wl,
      angleDeg: at.angleDeg,
      polarization: at.polarization,
    });
    const g = groups.length;
    evaluators.push(evaluator);
    groups.push({
      angleDeg: at.angleDeg,
      polarization: at.polarization,
      wavelengths: wl,
      R: new Float64Array(wl.length),
      T: new Float64Array(wl.length),
      A: new Float64Array(wl.length),
      conditions: conditionsText(at.angleDeg, at.polarization),
    });
    for (const b of members) {
      const band = mask.bands[b];
      const samples = bandSamples[b];
      if (!band || !samples) continue;
      bands[b] = plan(
        band,
        g,
        Int32Array.from(samples, (w) => position.get(wavelengthKey(w)) ?? 0),
        samples,
      );
    }
    const colourIndices = Int32Array.from(COLOUR_WAVELENGTHS, (w) => position.get(wavelengthKey(w)) ?? 0);
    for (const c of colourMembers) {
      const colour = colourList[c]!;
      colourPlans[c] = {
        id: colour.id,
        colour,
        group: g,
        indices: colourIndices,
        residualScale: colour.limit.type === "box-xy" ? COLOUR_XY_RESIDUAL_SCALE : 1,
      };
    }
  });
  // bands with conditions: one own group each
  const simpleGroups = groups.length;
  const complex: ComplexBand[] = [];
  let layerCount = evaluators[0]?.layerCount ?? design.layers.length;
  mask.bands.forEach((band, b) => {
    if (!isComplexBand(band)) return;
    const samples = bandSamples[b] ?? [];
    const q = band.quantity;
    const cb = new ComplexBand(design, band, samples, (R, T, A) => quantityValue(q, R, T, A), undefined, {
      defaultStepDeg: DEFAULT_ANGLE_STEP_DEG,
      toleranceDeg: ANGLE_RANGE_TOLERANCE_DEG,
      conditions: bandConditionsText(band),
    });
    const g = groups.length;
    complexOf.set(b, g);
    complex.push(cb);
    groups.push(cb.group);
    bands[b] = plan(
      band,
      g,
      Int32Array.from(samples, (_, i) => i),
      samples,
    );
  });

  if (bands.length + colourPlans.length === 0) throw new RangeError("mask.bands: no bands to evaluate");
  layerCount = design.layers.length;
  const nominalThicknesses = Float64Array.from(design.layers, (l) => l.thickness);
  const residualCount = bands.reduce((s, b) => s + b.residualCount, 0) + colourPlans.length;
  const ids = [...bands.map((b) => b.id), ...colourPlans.map((c) => c.id)];

  // Colour of a colour requirement from the last computation: samples gathered from its group (fractions),
  // summed with the CIE weights (colourFromSamples) and judged against the limit. A non-finite sample makes
  // the colour undefined: `nonFiniteAt` names the wavelength and the margin is NaN.
  const colourSamples = new Float64Array(COLOUR_WAVELENGTHS.length);
  const colourState: {
    colour: ColourCoordinates | null;
    judged: ColourJudgement | null;
    nonFiniteAt: number;
  } = {
    colour: null,
    judged: null,
    nonFiniteAt: Number.NaN,
  };
  const judgeColourPlan = (cp: ColourPlan): void => {
    const group = groups[cp.group] as GroupPlan;
    const src = cp.colour.quantity === "R" ? group.R : group.T;
    colourState.colour = null;
    colourState.judged = null;
    colourState.nonFiniteAt = Number.NaN;
    for (let k = 0; k < colourSamples.length; k++) {
      const v = src[cp.indices[k] as number] as number;
      if (!Number.isFinite(v)) {
        colourState.nonFiniteAt = COLOUR_WAVELENGTHS[k] as number;
        return;
      }
      colourSamples[k] = v;
    }
    const colour = colourFromSamples(colourSamples, {
      illuminant: cp.colour.illuminant,
      observer: cp.colour.observer,
    });
    colourState.colour = colour;
    colourState.judged = judgeColour(cp.colour.limit, colour);
  };
  const colourMargin = (cp: ColourPlan): number => {
    judgeColourPlan(cp);
    return colourState.judged ? colourState.judged.margin : Number.NaN;
  };
  const warnings = [
    ...new Set([...evaluators.flatMap((e) => e.warnings), ...complex.flatMap((c) => c.warnings)]),
  ];

  /** refine: search the worst angle of angle ranges; verdictOnly: skip the search where a sample already fails. */
  const computeWith = (
    thicknesses: Float64Array,
    indexScale: Float64Array | undefined,
    refine: boolean,
    verdictOnly: boolean,
  ): void => {
    if (thicknesses.length !== layerCount) {
      throw new RangeError(`thicknesses: expected ${layerCount} layers, got ${thicknesses.length}`);
    }
    if (indexScale) {
      if (indexScale.length !== layerCount)
        throw new RangeError(`indexScale: expected ${layerCount} factors, got ${indexScale.length}`);
      for (let j = 0; j < layerCount; j++) {
        const f = indexScale[j] as number;
        if (!(f > 0) || !Number.isFinite(f))
          throw new RangeError(`indexScale[${j}]: expected a finite factor > 0, got ${String(f)}`);
      }
    }
    for (let g = 0; g < simpleGroups; g++) {
      const group = groups[g] as GroupPlan;
      (evaluators[g] as (typeof evaluators)[number]).evaluate(thicknesses, group, indexScale);
    }
    let c = 0;
    for (let b = 0; b < bands.length; b++) {
      if (!complexOf.has(b)) continue;
      const cb = complex[c++] as ComplexBand;
      const p = bands[b] as BandPlan;
      const req = p.band.requirement;
      // a limit lets the search stop early only when it cannot change the verdict
      cb.compute(
        thicknesses,
        indexScale,
        refine,
        verdictOnly && (req === "min" || req === "max") ? p.limit : undefined,
      );
    }
  };
  const compute = (thicknesses: Float64Array, indexScale?: Float64Array): void =>
    computeWith(thicknesses, indexScale, true, false);

  // Scan one band of the last computation: fills scan.{worstIndex, worstValue, mean, nonFinite}.
  // A non-finite value is a failing sample: it becomes the worst point and the margin NaN.
  const scan = { worstIndex: 0, worstValue: 0, mean: 0, nonFinite: -1 };
  const scanBand = (plan: BandPlan): void => {
    const group = groups[plan.group] as GroupPlan;
    const q = plan.band.quantity;
    const wantLow = plan.band.requirement === "min" || plan.band.requirement === "avgMin";
    let worst = wantLow ? Infinity : -Infinity;
    let worstIndex = 0;
    let sum = 0;
    let nonFinite = -1;
    const idx = plan.indices;
    for (let k = 0; k < idx.length; k++) {
      const i = idx[k] as number;
      const v = quantityValue(q, group.R[i] as number, group.T[i] as number, group.A[i] as number);
      if (!Number.isFinite(v)) {
        if (nonFinite < 0) nonFinite = k;
        continue;
      }
      sum += v;
      if (wantLow ? v < worst : v > worst) {
        worst = v;
        worstIndex = k;
      }
    }
    if (nonFinite >= 0) {
      const i = idx[nonFinite] as number;
      worstIndex = nonFinite;
      worst = quantityValue(q, group.R[i] as number, group.T[i] as number, group.A[i] as number);
      sum = Number.NaN;
    }
    scan.worstIndex = worstIndex;
    scan.worstValue = worst;
    scan.mean = sum / idx.length;
    scan.nonFinite = nonFinite;
  };
  const worstPoint = (plan: BandPlan): WorstPoint => {
    const group = groups[plan.group] as GroupPlan;
    const i = plan.indices[scan.worstIndex] as number;
    const pol = group.polAt
      ? (POL_CODES[group.polAt[i] as number] as Polarization)
      : (plan.band.polarization as Polarization);
    return {
      wavelength: plan.wavelengths[scan.worstIndex] as number,
      value: scan.worstValue,
      angleDeg: group.angleAt ? (group.angleAt[i] as number) : plan.band.angleDeg,
      polarization: pol,
    };
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

  const colourOutcome = (cp: ColourPlan): BandOutcome => {
    const req = cp.colour;
    judgeColourPlan(cp);
    const nan = Number.NaN;
    const c = colourState.colour;
    const j = colourState.judged;
    const detail: ColourOutcome = {
      quantity: req.quantity,
      illuminant: req.illuminant,
      observer: req.observer,
      X: c ? c.X : nan,
      Y: c ? c.Y : nan,
      Z: c ? c.Z : nan,
      x: c ? c.x : nan,
      y: c ? c.y : nan,
      L: c ? c.L : nan,
      a: c ? c.a : nan,
      b: c ? c.b : nan,
      limiting: j
        ? j.limiting
        : req.limit.type === "delta-e"
          ? "deltaE"
          : req.limit.type === "box-xy"
            ? "x"
            : "a",
      swatch: c ? colourSwatch(c, true).hex : "#000000",
    };
    if (j?.deltaE !== undefined) detail.deltaE = j.deltaE;
    const worst: WorstPoint = {
      wavelength: nan,
      value: j ? j.value : nan,
      angleDeg: req.angleDeg,
      polarization: req.polarization,
    };
    if (!c || !j) {
      return {
        id: cp.id,
        pass: false,
        worst,
        margin: nan,
        average: nan,
        reason: `the spectrum is not finite at ${colourState.nonFiniteAt} nm (${req.angleDeg}°, ${req.polarization})`,
        colour: detail,
      };
    }
    const out: BandOutcome = {
      id: cp.id,
      pass: j.margin >= 0,
      worst,
      margin: j.margin,
      average: c.Y,
      colour: detail,
    };
    const reason = colourFailureReason(req.limit, c, j);
    if (reason) out.reason = reason;
    return out;
  };

  return {
    layerCount,
    nominalThicknesses,
    bands,
    colour: colourPlans,
    ids,
    groups,
    residualCount,
    warnings,
    compute,
    evaluate(thicknesses, indexScale) {
      compute(thicknesses, indexScale);
      const outcomes: BandOutcome[] = bands.map((plan) => {
        scanBand(plan);
        const worst = worstPoint(plan);
        if (scan.nonFinite >= 0) {
          const where =
            worst.angleDeg !== 0 || isComplexBand(plan.band)
              ? ` (${worst.angleDeg}°, ${worst.polarization})`
              : "";
          return {
            id: plan.id,
            pass: false,
            worst,
            margin: Number.NaN,
            average: scan.mean,
            reason: `the spectrum is not finite at ${worst.wavelength} nm${where}`,
          };
        }
        const margin = marginOf(plan);
        return { id: plan.id, pass: margin >= 0, worst, margin, average: scan.mean };
      });
      for (const cp of colourPlans) outcomes.push(colourOutcome(cp));
      return outcomes;
    },
    margins(thicknesses, out, indexScale) {
      computeWith(thicknesses, indexScale, true, true);
      let pass = true;
      for (let b = 0; b < bands.length; b++) {
        scanBand(bands[b] as BandPlan);
        const m = marginOf(bands[b] as BandPlan);
        out[b] = m;
        if (!(m >= 0)) pass = false;
      }
      for (let c = 0; c < colourPlans.length; c++) {
        const m = colourMargin(colourPlans[c] as ColourPlan);
        out[bands.length + c] = m;
        if (!(m >= 0)) pass = false;
      }
      return pass;
    },
    residuals(thicknesses, out, marginGoal = 0, indexScale, offset = 0) {
      // sampled angles only: the worst-angle search would make the merit jump as the design moves
      computeWith(thicknesses, indexScale, false, false);
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
          out[r++] = v > 0 ? v : Number.isFinite(v) ? 0 : NON_FINITE_PENALTY;
          continue;
        }
        const w = 1 / Math.sqrt(idx.length);
        const low = req === "min";
        for (let k = 0; k < idx.length; k++) {
          const i = idx[k] as number;
          const value = quantityValue(q, group.R[i] as number, group.T[i] as number, group.A[i] as number);
          const v = low ? plan.limit + marginGoal - value : value - (plan.limit - marginGoal);
          out[r++] = v > 0 ? v * w : Number.isFinite(v) ? 0 : NON_FINITE_PENALTY * w;
        }
      }
      // colour: how far the colour lies past its limit (moved inward by marginGoal), x/y boxes in hundredths
      for (const cp of colourPlans) {
        const v = marginGoal - colourMargin(cp) * cp.residualScale;
        out[r++] = v > 0 ? v : Number.isFinite(v) ? 0 : NON_FINITE_PENALTY;
      }
    },
    violations(b) {
      if (b >= bands.length && b < bands.length + colourPlans.length) return []; // a colour has no sample points
      const plan = bands[b];
      if (!plan) throw new RangeError(`band index ${b} out of range`);
      const group = groups[plan.group] as GroupPlan;
      const req = plan.band.requirement;
      const out: WorstPoint[] = [];
      for (let k = 0; k < plan.indices.length; k++) {
        const i = plan.indices[k] as number;
        const v = quantityValue(
          plan.band.quantity,
          group.R[i] as number,
          group.T[i] as number,
          group.A[i] as number,
        );
        const bad =
          !Number.isFinite(v) || (req === "min" && v < plan.limit) || (req === "max" && v > plan.limit);
        if (!bad) continue;
        out.push({
          wavelength: plan.wavelengths[k] as number,
          value: v,
          angleDeg: group.angleAt ? (group.angleAt[i] as number) : plan.band.angleDeg,
          polarization: group.polAt
            ? (POL_CODES[group.polAt[i] as number] as Polarization)
            : plan.band.polarization === "sp"
              ? "s"
              : plan.band.polarization,
        });
      }
      return out;
    },
    bandValues(b, out) {
      const plan = bands[b];
      if (!plan)
        throw new RangeError(`band index ${b} out of range (colour requirements have no band values)`);
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
export function evaluateSpec(design: Design, maskInput: SpecMaskInput): SpecResult {
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
  bandInput: SpecBandInput,
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
    worst: {
      wavelength: worstAt,
      value: worst,
      angleDeg: band.angleDeg,
      polarization: band.polarization === "sp" ? "s" : band.polarization,
    },
    margin,
    average: mean,
  };
}
