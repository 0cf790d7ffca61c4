import type { Design } from "../core/index.ts";
import { levenbergMarquardt } from "./least-squares.ts";
import { createTrialSampler } from "./error-model.ts";
import { createYieldRunner, parseYieldStudy, planChunks } from "./montecarlo.ts";
import type { YieldStudy } from "./montecarlo.ts";
import { TrialRandom } from "./random.ts";
import { createSpecEvaluator, meritOf, parseSpecMask, sumOfSquares } from "./spec.ts";
import type { SpecMask } from "./spec.ts";
import { wilsonInterval } from "./wilson.ts";
import type { ProportionInterval } from "./wilson.ts";

/** Thickness bounds and locking shared by the refinement functions. Thicknesses in nm. */
export interface RefineBoundsOptions {
  /** Layer indices (deposition order) held fixed, in addition to layers with `locked: true`. */
  lockedLayers?: number[];
  /** Lower bound of every free layer (nm), default 0. */
  minThickness?: number;
  /** Upper bound of every free layer (nm), default unbounded. */
  maxThickness?: number;
  /** Per-layer bounds overriding the global ones. */
  layerBounds?: { index: number; min?: number; max?: number }[];
  /**
   * Limits are moved inward by this much (band units: percent, or OD) while refining, so the result passes
   * with margin rather than on the edge. Default 0.1. The reported merits always use the real limits.
   */
  marginGoal?: number;
  maxIterations?: number;
}

/** Options of {@link refineDesign}. */
export type RefineOptions = RefineBoundsOptions;

/** Result of {@link refineDesign}. */
export interface RefineResult {
  design: Design;
  meritBefore: number;
  meritAfter: number;
  iterations: number;
  changedLayers: { index: number; before: number; after: number }[];
}

/** Free layers and their bounds. */
export interface FreeLayers {
  indices: number[];
  lower: Float64Array;
  upper: Float64Array;
}

/** Resolve which layers are free and their bounds; throws RangeError on bad indices or bounds. */
export function resolveFreeLayers(design: Design, options: RefineBoundsOptions): FreeLayers {
  const count = design.layers.length;
  const locked = new Set<number>();
  for (const i of options.lockedLayers ?? []) {
    if (!Number.isInteger(i) || i < 0 || i >= count)
      throw new RangeError(`lockedLayers: layer index must be in 0..${count - 1}, got ${i}`);
    locked.add(i);
  }
  design.layers.forEach((l, i) => {
    if (l.locked) locked.add(i);
  });
  const min = options.minThickness ?? 0;
  const max = options.maxThickness ?? Infinity;
  if (!(min >= 0)) throw new RangeError(`minThickness must be ≥ 0 nm, got ${min}`);
  if (!(max >= min)) throw new RangeError(`maxThickness must be ≥ minThickness (${min} nm), got ${max}`);
  const lo = new Array<number>(count).fill(min);
  const hi = new Array<number>(count).fill(max);
  for (const b of options.layerBounds ?? []) {
    if (!Number.isInteger(b.index) || b.index < 0 || b.index >= count) {
      throw new RangeError(`layerBounds: layer index must be in 0..${count - 1}, got ${b.index}`);
    }
    if (b.min !== undefined) lo[b.index] = b.min;
    if (b.max !== undefined) hi[b.index] = b.max;
    if (!((lo[b.index] as number) >= 0) || !((hi[b.index] as number) >= (lo[b.index] as number))) {
      throw new RangeError(
        `layerBounds[${b.index}]: need 0 ≤ min ≤ max, got min ${lo[b.index]} max ${hi[b.index]}`,
      );
    }
  }
  const indices = design.layers.map((_, i) => i).filter((i) => !locked.has(i));
  return {
    indices,
    lower: Float64Array.from(indices, (i) => lo[i] as number),
    upper: Float64Array.from(indices, (i) => hi[i] as number),
  };
}

/** Copy of `design` with new layer thicknesses (nm, deposition order). */
export function withThicknesses(design: Design, thicknesses: ArrayLike<number>): Design {
  return { ...design, layers: design.layers.map((l, i) => ({ ...l, thickness: thicknesses[i] as number })) };
}

function changed(before: ArrayLike<number>, after: ArrayLike<number>): RefineResult["changedLayers"] {
  const out: RefineResult["changedLayers"] = [];
  for (let i = 0; i < before.length; i++) {
    const b = before[i] as number;
    const a = after[i] as number;
    if (Math.abs(a - b) > 1e-9) out.push({ index: i, before: b, after: a });
  }
  return out;
}

/** Finite-difference step for thickness parameters (nm). */
export const THICKNESS_FD_STEP_NM = 1e-3;

/**
 * Refine layer thicknesses (nm) to minimise the spec-mask merit (see createSpecEvaluator) by bounded
 * Levenberg–Marquardt over the residuals of every band sample. Locked layers stay fixed; free layers stay
 * inside [minThickness, maxThickness] (or their layerBounds). Deterministic.
 */
export function refineDesign(design: Design, maskInput: SpecMask, options: RefineOptions = {}): RefineResult {
  const mask = parseSpecMask(maskInput);
  const evaluator = createSpecEvaluator(design, mask);
  const free = resolveFreeLayers(design, options);
  const nominal = Float64Array.from(evaluator.nominalThicknesses);
  const work = Float64Array.from(nominal);
  const goal = options.marginGoal ?? 0.1;
  const meritBefore = meritOf(evaluator, nominal);
  if (free.indices.length === 0) {
    return { design, meritBefore, meritAfter: meritBefore, iterations: 0, changedLayers: [] };
  }
  const fit = levenbergMarquardt(
    {
      parameterCount: free.indices.length,
      residualCount: evaluator.residualCount,
      lower: free.lower,
      upper: free.upper,
      steps: new Float64Array(free.indices.length).fill(THICKNESS_FD_STEP_NM),
      residuals(x, out) {
        free.indices.forEach((layer, k) => (work[layer] = x[k] as number));
        evaluator.residuals(work, out, goal);
      },
    },
    Float64Array.from(free.indices, (i) => nominal[i] as number),
    { maxIterations: options.maxIterations ?? 50 },
  );
  const after = Float64Array.from(nominal);
  free.indices.forEach((layer, k) => (after[layer] = fit.x[k] as number));
  const meritAfter = meritOf(evaluator, after);
  // Never hand back a design that is worse on the real merit than the start.
  if (meritAfter > meritBefore)
    return { design, meritBefore, meritAfter: meritBefore, iterations: fit.iterations, changedLayers: [] };
  return {
    design: withThicknesses(design, after),
    meritBefore,
    meritAfter,
    iterations: fit.iterations,
    changedLayers: changed(nominal, after),
  };
}

/** Options of {@link refineForYield}. */
export interface RefineForYieldOptions extends RefineBoundsOptions {
  /** Size of the fixed common-random-number trial set (default 48), drawn from seed `${seed}/refine`. */
  crnTrials?: number;
  /** Trials for the before/after yield (default: the study's `trials`, with the study's seed). */
  evaluationTrials?: number;
}

/** Result of {@link refineForYield}. */
export interface RefineForYieldResult extends RefineResult {
  yieldBefore: number;
  yieldAfter: number;
  intervalBefore: ProportionInterval;
  intervalAfter: ProportionInterval;
  evaluationTrials: number;
  /** Mean merit over the common-random-number set (real limits), before and after. */
  meanMeritBefore: number;
  meanMeritAfter: number;
}

/**
 * Yield-centred refinement: minimise the mean spec-mask merit over a fixed set of simulated builds
 * (common random numbers: trial k of seed `${seed}/refine` redraws the same standard errors whatever the
 * thicknesses, so the objective is smooth and deterministic), by bounded Levenberg–Marquardt. Relative
 * thickness errors scale with the layer being refined. Yield before and after is then measured with the
 * study's own seed (trials independent of the refinement set).
 */
export function refineForYield(
  studyInput: YieldStudy,
  options: RefineForYieldOptions = {},
): RefineForYieldResult {
  const study = parseYieldStudy(studyInput);
  const design = study.design as Design;
  const evaluator = createSpecEvaluator(design, study.mask);
  const free = resolveFreeLayers(design, options);
  const K = options.crnTrials ?? 48;
  if (!Number.isInteger(K) || K < 1 || K > 2000)
    throw new RangeError(`crnTrials must be an integer in 1..2000, got ${K}`);
  const evalTrials = options.evaluationTrials ?? study.trials;
  if (!Number.isInteger(evalTrials) || evalTrials < 1 || evalTrials > 200000) {
    throw new RangeError(`evaluationTrials must be an integer in 1..200000, got ${evalTrials}`);
  }
  const sampler = createTrialSampler(
    study.errorModel,
    design.layers.map((l) => l.material),
  );
  const rng = new TrialRandom();
  const crnSeed = `${study.seed}/refine`;
  const L = evaluator.layerCount;
  const work = Float64Array.from(evaluator.nominalThicknesses);
  const thick = new Float64Array(L);
  const scale = new Float64Array(L);
  const R = evaluator.residualCount;
  const w = 1 / Math.sqrt(K);
  const goal = options.marginGoal ?? 0.1;

  const crnResiduals = (nominal: Float64Array, out: Float64Array, marginGoal: number): void => {
    for (let k = 0; k < K; k++) {
      sampler.sample(rng, crnSeed, k, nominal, thick, scale);
      evaluator.residuals(thick, out, marginGoal, scale, k * R);
    }
    for (let i = 0; i < out.length; i++) out[i] = (out[i] as number) * w;
  };
  const meanMerit = (nominal: Float64Array): number => {
    const out = new Float64Array(K * R);
    crnResiduals(nominal, out, 0);
    return sumOfSquares(out);
  };
  const yieldOf = (d: Design): number => {
    const runner = createYieldRunner({ ...study, design: d, trials: evalTrials, envelopeSamples: 0 });
    let pass = 0;
    for (const [s, c] of planChunks(evalTrials, 1000)) pass += runner.runChunk(s, c).passCount;
    return pass;
  };

  const nominal = Float64Array.from(evaluator.nominalThicknesses);
  const meritBefore = meritOf(evaluator, nominal);
  const meanMeritBefore = meanMerit(nominal);
  const passBefore = yieldOf(design);
  let after = Float64Array.from(nominal);
  let iterations = 0;
  if (free.indices.length > 0) {
    const fit = levenbergMarquardt(
      {
        parameterCount: free.indices.length,
        residualCount: K * R,
        lower: free.lower,
        upper: free.upper,
        steps: new Float64Array(free.indices.length).fill(THICKNESS_FD_STEP_NM),
        residuals(x, out) {
          free.indices.forEach((layer, k) => (work[layer] = x[k] as number));
          crnResiduals(work, out, goal);
        },
      },
      Float64Array.from(free.indices, (i) => nominal[i] as number),
      { maxIterations: options.maxIterations ?? 15 },
    );
    iterations = fit.iterations;
    free.indices.forEach((layer, k) => (after[layer] = fit.x[k] as number));
  }
  let meanMeritAfter = meanMerit(after);
  let refined = withThicknesses(design, after);
  let passAfter = yieldOf(refined);
  if (passAfter < passBefore) {
    // The refinement set disagreed with the independent trials: keep the original design.
    after = Float64Array.from(nominal);
    refined = design;
    passAfter = passBefore;
    meanMeritAfter = meanMeritBefore;
  }
  return {
    design: refined,
    meritBefore,
    meritAfter: meritOf(evaluator, after),
    iterations,
    changedLayers: changed(nominal, after),
    yieldBefore: passBefore / evalTrials,
    yieldAfter: passAfter / evalTrials,
    intervalBefore: wilsonInterval(passBefore, evalTrials),
    intervalAfter: wilsonInterval(passAfter, evalTrials),
    evaluationTrials: evalTrials,
    meanMeritBefore,
    meanMeritAfter,
  };
}
