// What one request may ask the server to compute (the API refuses each with 400 limit_exceeded whose message names
// the limit), so heavy work cannot be smuggled in through one revision, program or yield run. The optics package
// keeps its own, looser engine caps (MAX_BAND_POINTS, MAX_TRIALS); these are the product's policy.
import type { z } from "zod";
import { bandWavelengths } from "@stackproof/optics";

/** Spec bands in one mask (a revision's or a program's). */
export const MAX_SPEC_BANDS = 32;
/** Wavelength samples in one band (see bandWavelengths: explicit step, or 1 nm capped at 501 points). */
export const MAX_POINTS_PER_BAND = 2001;
/** Layers in one design. */
export const MAX_LAYERS = 400;
/** Trials in one yield run: the verified-run pool shares its threads fairly in chunks, so a run this size holds
 * no other run back (the optics engine cap, MAX_TRIALS, is the same). */
export const MAX_TRIALS_PER_RUN = 200_000;

export const REQUEST_LIMITS = {
  MAX_SPEC_BANDS,
  MAX_POINTS_PER_BAND,
  MAX_LAYERS,
  MAX_TRIALS_PER_RUN,
} as const;

export interface LimitProblem {
  limit: keyof typeof REQUEST_LIMITS;
  max: number;
  got: number;
  path: (string | number)[];
  message: string;
}

interface BandLike {
  id?: unknown;
  start: number;
  stop: number;
  step?: number;
}

/**
 * Problems of a spec mask against MAX_SPEC_BANDS (bands and colour requirements together: each colour
 * requirement is evaluated on 81 wavelengths) and MAX_POINTS_PER_BAND (an unparsed mask gives none).
 */
export function maskLimitProblems(mask: unknown): LimitProblem[] {
  const bands = (mask as { bands?: unknown } | null)?.bands;
  if (!Array.isArray(bands)) return [];
  const colour = (mask as { colour?: unknown }).colour;
  const colourCount = Array.isArray(colour) ? colour.length : 0;
  const out: LimitProblem[] = [];
  if (bands.length + colourCount > MAX_SPEC_BANDS) {
    out.push({
      limit: "MAX_SPEC_BANDS",
      max: MAX_SPEC_BANDS,
      got: bands.length + colourCount,
      path: colourCount > 0 && bands.length <= MAX_SPEC_BANDS ? ["colour"] : ["bands"],
      message: `The spec mask has ${bands.length} bands${colourCount > 0 ? ` and ${colourCount} colour requirements` : ""}; one request may ask for at most ${MAX_SPEC_BANDS} together (MAX_SPEC_BANDS).`,
    });
    return out;
  }
  bands.forEach((b: BandLike, i) => {
    if (!b || typeof b.start !== "number" || typeof b.stop !== "number" || !(b.stop >= b.start)) return;
    if (b.step !== undefined && !(typeof b.step === "number" && b.step > 0)) return;
    // Counted without building the array when the step would give millions of samples.
    const estimate = b.step === undefined ? 0 : Math.floor((b.stop - b.start) / b.step) + 2;
    const points = estimate > MAX_POINTS_PER_BAND + 1 ? estimate : bandWavelengths(b).length;
    if (points > MAX_POINTS_PER_BAND) {
      out.push({
        limit: "MAX_POINTS_PER_BAND",
        max: MAX_POINTS_PER_BAND,
        got: points,
        path: ["bands", i, "step"],
        message: `Band ${typeof b.id === "string" ? `"${b.id}"` : i + 1} samples ${points} wavelengths; one band may have at most ${MAX_POINTS_PER_BAND} (MAX_POINTS_PER_BAND). Use a larger step.`,
      });
    }
  });
  return out;
}

/** Problems of a design (the optics JSON format, unparsed) against MAX_LAYERS. */
export function designLimitProblems(design: unknown): LimitProblem[] {
  const layers = (design as { layers?: unknown } | null)?.layers;
  if (!Array.isArray(layers) || layers.length <= MAX_LAYERS) return [];
  return [
    {
      limit: "MAX_LAYERS",
      max: MAX_LAYERS,
      got: layers.length,
      path: ["layers"],
      message: `The design has ${layers.length} layers; one design may have at most ${MAX_LAYERS} (MAX_LAYERS).`,
    },
  ];
}

/** For zod schemas at the edge: adds one issue per limit problem of a spec mask. */
export function refineMaskLimits(mask: unknown, ctx: z.RefinementCtx): void {
  for (const p of maskLimitProblems(mask)) ctx.addIssue({ code: "custom", path: p.path, message: p.message });
}

export const trialsLimitMessage = `At most ${MAX_TRIALS_PER_RUN} trials per yield run (MAX_TRIALS_PER_RUN).`;
