import { z } from "zod";
import type { TrialRandom } from "./random.ts";
import { parseWith } from "./validate.ts";
import { ProcessModelSchema, scaleProcessModel } from "./process/schema.ts";

const perMaterial = z.union([z.number().min(0).finite(), z.record(z.string(), z.number().min(0).finite())]);

/**
 * Process error model of one deposition run. All spreads are 1σ.
 * - thickness: random per-layer error with σ_j = √((relativePct/100 · d_j)² + absoluteNm²), normal
 *   (optionally truncated at ±truncateSigma·σ) or uniform with the same σ (half-width √3 σ).
 * - systematicPct: per-material thickness scale per run (tooling / calibration), % of thickness.
 * - indexDriftPct: per-material refractive-index scale per run (%), applied to the whole N of every layer of that material.
 * - indexNoisePct: independent per-layer index scale (%).
 * A number applies to every material; a record names materials (missing ones get 0).
 * - process (optional, version 1 of the process format): how the chamber controls each layer (time,
 *   quartz crystal or optical monitoring, uniformity). When present, the process produces every layer's
 *   thickness and `thickness` and `systematicPct` are not used; the index terms above still apply and
 *   optical monitoring reacts to them. Without it the model is the independent-error model.
 */
export const ErrorModelSchema = z.object({
  thickness: z.object({
    relativePct: z.number().min(0).max(100),
    absoluteNm: z.number().min(0).finite(),
    distribution: z.enum(["normal", "uniform"]),
    truncateSigma: z.number().min(0.5).max(20).optional(),
  }),
  systematicPct: perMaterial.optional(),
  indexDriftPct: perMaterial.optional(),
  indexNoisePct: z.number().min(0).max(50).optional(),
  process: ProcessModelSchema.optional(),
});
export type ErrorModel = z.output<typeof ErrorModelSchema>;

/** Validate an error model; throws a RangeError naming the field and value on bad input. */
export function parseErrorModel(input: unknown): ErrorModel {
  return parseWith(ErrorModelSchema, input, "errorModel");
}

/** Multiply every σ of an error model by `scale` (truncation stays in σ units). */
export function scaleErrorModel(model: ErrorModel, scale: number): ErrorModel {
  if (!(scale >= 0) || !Number.isFinite(scale))
    throw new RangeError(`scale must be a finite number ≥ 0, got ${scale}`);
  const scaleMap = (v: ErrorModel["systematicPct"]): ErrorModel["systematicPct"] =>
    v === undefined
      ? undefined
      : typeof v === "number"
        ? v * scale
        : Object.fromEntries(Object.entries(v).map(([k, x]) => [k, x * scale]));
  const out: ErrorModel = {
    thickness: {
      ...model.thickness,
      relativePct: model.thickness.relativePct * scale,
      absoluteNm: model.thickness.absoluteNm * scale,
    },
  };
  const sys = scaleMap(model.systematicPct);
  const drift = scaleMap(model.indexDriftPct);
  if (sys !== undefined) out.systematicPct = sys;
  if (drift !== undefined) out.indexDriftPct = drift;
  if (model.indexNoisePct !== undefined) out.indexNoisePct = model.indexNoisePct * scale;
  if (model.process !== undefined) out.process = scaleProcessModel(model.process, scale);
  return out;
}

/**
 * Sampler of the error model for one layer structure. Draw order per trial (fixed, independent of
 * which σ are zero, so scaled models reuse the same standard draws): one systematic draw per material
 * (materials sorted by id), one drift draw per material, then per layer one thickness draw and one
 * index-noise draw.
 */
export interface TrialSampler {
  readonly materials: readonly string[];
  /** False when the model has no index drift or noise: every index factor is then exactly 1. */
  readonly hasIndexErrors: boolean;
  /**
   * Draw trial `index` of `seed` applied to `nominal` thicknesses (nm) into `thicknessOut` (nm, clamped at 0)
   * and `indexScaleOut` (per-layer factor on N).
   */
  sample(
    rng: TrialRandom,
    seed: string,
    index: number,
    nominal: Float64Array,
    thicknessOut: Float64Array,
    indexScaleOut: Float64Array,
  ): void;
}

/** Build a sampler for layers made of `layerMaterials` (deposition order). */
export function createTrialSampler(model: ErrorModel, layerMaterials: readonly string[]): TrialSampler {
  const materials = [...new Set(layerMaterials)].sort();
  const materialOf = Int32Array.from(layerMaterials, (m) => materials.indexOf(m));
  const sigmaFor = (v: ErrorModel["systematicPct"], m: string): number =>
    v === undefined ? 0 : typeof v === "number" ? v / 100 : (v[m] ?? 0) / 100;
  const sysSigma = Float64Array.from(materials, (m) => sigmaFor(model.systematicPct, m));
  const driftSigma = Float64Array.from(materials, (m) => sigmaFor(model.indexDriftPct, m));
  const sysScale = new Float64Array(materials.length);
  const driftScale = new Float64Array(materials.length);
  const rel = model.thickness.relativePct / 100;
  const abs = model.thickness.absoluteNm;
  const noise = (model.indexNoisePct ?? 0) / 100;
  const { distribution, truncateSigma } = model.thickness;
  const hasIndexErrors = noise > 0 || driftSigma.some((v) => v > 0);
  return {
    materials,
    hasIndexErrors,
    sample(rng, seed, index, nominal, thicknessOut, indexScaleOut) {
      rng.reset(seed, index);
      for (let m = 0; m < materials.length; m++) sysScale[m] = 1 + (sysSigma[m] as number) * rng.normal();
      for (let m = 0; m < materials.length; m++) driftScale[m] = 1 + (driftSigma[m] as number) * rng.normal();
      for (let j = 0; j < nominal.length; j++) {
        const d = nominal[j] as number;
        const m = materialOf[j] as number;
        const rd = rel * d;
        const sigma = Math.sqrt(rd * rd + abs * abs);
        const t = d * (sysScale[m] as number) + sigma * rng.draw(distribution, truncateSigma);
        thicknessOut[j] = t > 0 ? t : 0;
        indexScaleOut[j] = (driftScale[m] as number) * (1 + noise * rng.normal());
      }
    },
  };
}
