import { z } from "zod";
import { DesignSchema, parseDesign } from "../core/index.ts";
import type { Design } from "../core/index.ts";
import { ENGINE_VERSION } from "../version.ts";
import { ErrorModelSchema, scaleErrorModel } from "./error-model.ts";
import { createStudySampler } from "./process/sampler.ts";
import type { ErrorModel } from "./error-model.ts";
import { TrialRandom } from "./random.ts";
import {
  createSpecEvaluator,
  meritOf,
  parseSpecMask,
  PROTECTIVE_CAUTION,
  quantityValue,
  SpecMaskSchema,
} from "./spec.ts";
import type { BandPolarization, GroupPlan, SpecEvaluator, SpecQuantity } from "./spec.ts";
import { parseWith } from "./validate.ts";
import { wilsonInterval } from "./wilson.ts";
import type { ProportionInterval } from "./wilson.ts";

/** Largest number of trials one study may ask for. */
export const MAX_TRIALS = 200000;
/** Default number of trials (the first ones, by index) whose spectra feed the percentile envelopes. */
export const DEFAULT_ENVELOPE_SAMPLES = 1000;
/** Relative thickness errors are summed as integers in units of 1/ERROR_QUANTUM for exact, order-free merging. */
export const ERROR_QUANTUM = 1e5;

/**
 * A Monte Carlo yield study: design, spec mask, error model, trial count and seed. Trial i draws only
 * from seedrandom(`${seed}#${i}`), so the result is the same for any chunking or worker count.
 * - envelopePercentiles: percentiles (0–100) of the spectral envelopes, default [5, 50, 95].
 * - histogramBins: bins of the worst-margin histogram, default 40.
 * - envelopeSamples: envelopes use the spectra of trials 0 … envelopeSamples − 1 (default 1000, capped at trials).
 */
export const YieldStudySchema = z.object({
  design: DesignSchema,
  mask: SpecMaskSchema,
  errorModel: ErrorModelSchema,
  trials: z.number().int().min(1).max(MAX_TRIALS),
  seed: z.string().min(1).max(200),
  envelopePercentiles: z.array(z.number().min(0).max(100)).min(1).max(21).optional(),
  histogramBins: z.number().int().min(1).max(1000).optional(),
  envelopeSamples: z.number().int().min(0).max(10000).optional(),
});
export type YieldStudy = z.input<typeof YieldStudySchema>;
type ParsedStudy = z.output<typeof YieldStudySchema>;

/** Validate a yield study; throws a RangeError naming the field and value on bad input. */
export function parseYieldStudy(input: unknown): ParsedStudy {
  const study = parseWith(YieldStudySchema, input, "study");
  try {
    parseDesign(study.design); // resolves every material id
  } catch (error) {
    if (error instanceof RangeError) throw new RangeError(`study.design.${error.message}`);
    throw error;
  }
  return study;
}

/** Partial result of trials [startTrial, startTrial + count). Plain JSON; merged exactly by {@link mergeYieldChunks}. */
export interface YieldChunk {
  /** Seed and trial count of the study the chunk belongs to (checked when merging). */
  seed: string;
  trials: number;
  startTrial: number;
  count: number;
  passCount: number;
  /** Failures per band, in mask order, then per colour requirement (SpecEvaluator.ids). */
  bandFailures: number[];
  /** Per trial (in index order): the smallest margin (band or colour units); < 0 means the trial failed. */
  worstMargins: number[];
  /**
   * Per layer, integer sums of q = round(e · ERROR_QUANTUM) where e is the layer's relative thickness
   * error of the trial (clamped to ±1): Σq, Σq², Σq over failed trials, Σ|q|, Σ|q| over failed trials.
   * Integer sums below 2^53 are exact, so merging is independent of order.
   */
  errorSums: { q: number[]; q2: number[]; qFail: number[]; absQ: number[]; absQFail: number[] };
  /** Spectra of envelope-sample trials in this chunk: per trial, one value array per envelope. */
  envelopeSamples: { trial: number; values: number[][] }[];
}

/** Percentile envelope of one quantity at one (angle, polarization) over the union of its bands' samples. */
export interface YieldEnvelope {
  quantity: SpecQuantity;
  polarization: BandPolarization;
  /** the band conditions in words (angle range, cone, polarization) */
  conditions: string;
  angleDeg: number;
  wavelengths: number[];
  /** Percentiles p (0–100) by linear interpolation between order statistics (type 7). */
  percentiles: { p: number; values: number[] }[];
  /** Number of trials the envelope was computed from. */
  sampleCount: number;
}

/** Merged result of a yield study. */
export interface YieldResult {
  trials: number;
  seed: string;
  passCount: number;
  yield: number;
  interval: ProportionInterval;
  /** Failing trials per band, then per colour requirement (ids as in the mask). */
  bandFailures: { id: string; count: number }[];
  /** Histogram of each trial's worst margin (band units; a colour requirement's margin in its limit's units). */
  marginHistogram: { edges: number[]; counts: number[] };
  envelopes: YieldEnvelope[];
  /**
   * Layers ranked by how strongly their thickness error goes with failure: `correlation` is the
   * point-biserial (Pearson) correlation of the relative error with the failure indicator,
   * `absErrorCorrelation` the same for |error| (catches layers where either direction fails).
   */
  criticalLayers: { layer: number; correlation: number; absErrorCorrelation: number }[];
  nominal: { pass: boolean; merit: number };
  errorModel: ErrorModel;
  cautions: string[];
  /**
   * Things a reviewer should know: material ids named in the error model that no layer uses (a typo
   * there silently removes an error term), and notes from material tabulation.
   */
  warnings: string[];
  engineVersion: string;
}

/** Material ids named in per-material error-model records that no layer of the design uses. */
export function unusedErrorModelMaterials(model: ErrorModel, layerMaterials: readonly string[]): string[] {
  const used = new Set(layerMaterials);
  const out: string[] = [];
  for (const [field, value] of [
    ["systematicPct", model.systematicPct],
    ["indexDriftPct", model.indexDriftPct],
  ] as const) {
    if (value === undefined || typeof value === "number") continue;
    for (const id of Object.keys(value)) {
      if (!used.has(id))
        out.push(`errorModel.${field} names material ${JSON.stringify(id)}, which no layer uses`);
    }
  }
  return out;
}

interface EnvelopePlan {
  quantity: SpecQuantity;
  group: number;
  indices: Int32Array;
  wavelengths: number[];
}

function planEnvelopes(evaluator: SpecEvaluator): EnvelopePlan[] {
  const plans: EnvelopePlan[] = [];
  const keyed = new Map<string, { quantity: SpecQuantity; group: number; idx: Set<number> }>();
  for (const band of evaluator.bands) {
    const key = `${band.band.quantity}|${band.group}`;
    let entry = keyed.get(key);
    if (!entry) {
      entry = { quantity: band.band.quantity, group: band.group, idx: new Set() };
      keyed.set(key, entry);
    }
    for (const i of band.indices) entry.idx.add(i);
  }
  for (const entry of keyed.values()) {
    const indices = Int32Array.from([...entry.idx].sort((a, b) => a - b));
    const group = evaluator.groups[entry.group] as GroupPlan;
    plans.push({
      quantity: entry.quantity,
      group: entry.group,
      indices,
      wavelengths: Array.from(indices, (i) => group.wavelengths[i] as number),
    });
  }
  return plans;
}

/** A prepared study: compiled evaluator, sampler and buffers, reused across chunks. */
export interface YieldRunner {
  readonly study: ParsedStudy;
  readonly evaluator: SpecEvaluator;
  runChunk(startTrial: number, count: number): YieldChunk;
}

/** Compile a study once for many chunks (what a worker keeps between messages). */
export function createYieldRunner(studyInput: YieldStudy): YieldRunner {
  const study = parseYieldStudy(studyInput);
  const design = study.design as Design;
  const evaluator = createSpecEvaluator(design, study.mask);
  const sampler = createStudySampler(study.errorModel, design);
  const envelopes = planEnvelopes(evaluator);
  const envelopeSamples = Math.min(study.trials, study.envelopeSamples ?? DEFAULT_ENVELOPE_SAMPLES);
  const nominal = evaluator.nominalThicknesses;
  const layers = evaluator.layerCount;
  const rng = new TrialRandom();
  const thick = new Float64Array(layers);
  const scale = new Float64Array(layers);
  const margins = new Float64Array(evaluator.ids.length);
  const qBuf = new Float64Array(layers);

  return {
    study,
    evaluator,
    runChunk(startTrial, count) {
      if (!Number.isInteger(startTrial) || startTrial < 0 || startTrial >= study.trials) {
        throw new RangeError(`startTrial must be an integer in 0..${study.trials - 1}, got ${startTrial}`);
      }
      if (!Number.isInteger(count) || count < 1 || startTrial + count > study.trials) {
        throw new RangeError(`count must be an integer in 1..${study.trials - startTrial}, got ${count}`);
      }
      const bandFailures = new Array<number>(evaluator.ids.length).fill(0);
      const worstMargins = new Array<number>(count);
      const sums = {
        q: new Array<number>(layers).fill(0),
        q2: new Array<number>(layers).fill(0),
        qFail: new Array<number>(layers).fill(0),
        absQ: new Array<number>(layers).fill(0),
        absQFail: new Array<number>(layers).fill(0),
      };
      const samples: YieldChunk["envelopeSamples"] = [];
      let passCount = 0;
      for (let t = 0; t < count; t++) {
        const trial = startTrial + t;
        sampler.sample(rng, study.seed, trial, nominal, thick, scale);
        // Without index errors every factor is 1: skip them so the evaluator keeps its tabulated admittances.
        const pass = evaluator.margins(thick, margins, sampler.hasIndexErrors ? scale : undefined);
        let worst = Infinity;
        for (let b = 0; b < margins.length; b++) {
          const m = margins[b] as number;
          if (!(m >= 0)) bandFailures[b] = (bandFailures[b] as number) + 1;
          if (m < worst || Number.isNaN(m)) worst = m;
        }
        worstMargins[t] = worst;
        if (pass) passCount++;
        for (let j = 0; j < layers; j++) {
          const d = nominal[j] as number;
          let e = d > 0 ? (thick[j] as number) / d - 1 : 0;
          e = e > 1 ? 1 : e < -1 ? -1 : e;
          qBuf[j] = Math.round(e * ERROR_QUANTUM);
        }
        for (let j = 0; j < layers; j++) {
          const q = qBuf[j] as number;
          const a = Math.abs(q);
          sums.q[j] = (sums.q[j] as number) + q;
          sums.q2[j] = (sums.q2[j] as number) + q * q;
          sums.absQ[j] = (sums.absQ[j] as number) + a;
          if (!pass) {
            sums.qFail[j] = (sums.qFail[j] as number) + q;
            sums.absQFail[j] = (sums.absQFail[j] as number) + a;
          }
        }
        if (trial < envelopeSamples) {
          samples.push({
            trial,
            values: envelopes.map((env) => {
              const g = evaluator.groups[env.group] as GroupPlan;
              return Array.from(env.indices, (i) =>
                quantityValue(env.quantity, g.R[i] as number, g.T[i] as number, g.A[i] as number),
              );
            }),
          });
        }
      }
      return {
        seed: study.seed,
        trials: study.trials,
        startTrial,
        count,
        passCount,
        bandFailures,
        worstMargins,
        errorSums: sums,
        envelopeSamples: samples,
      };
    },
  };
}

/** Run trials [startTrial, startTrial + count) of a study. */
export function runYieldChunk(study: YieldStudy, startTrial: number, count: number): YieldChunk {
  return createYieldRunner(study).runChunk(startTrial, count);
}

/** Percentile p (0–100) of ascending `sorted` by linear interpolation between order statistics (Hyndman–Fan type 7). */
export function percentileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const h = (n - 1) * (p / 100);
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  const a = sorted[lo] as number;
  const b = sorted[hi] as number;
  return a + (h - lo) * (b - a);
}

function correlation(n: number, sx: number, sxx: number, sxf: number, nf: number): number {
  if (n < 2 || nf === 0 || nf === n) return 0;
  const mx = sx / n;
  const mf = nf / n;
  const cov = sxf / n - mx * mf;
  const vx = sxx / n - mx * mx;
  const vf = mf * (1 - mf);
  if (!(vx > 0)) return 0;
  const r = cov / Math.sqrt(vx * vf);
  return Math.max(-1, Math.min(1, r));
}

/**
 * Merge chunks covering trials 0 … trials − 1 exactly once (any sizes, any order) into the study result.
 * Every merged quantity is either an exact integer sum or computed from data sorted by trial index, so the
 * result does not depend on chunk order or sizes.
 */
export function mergeYieldChunks(studyInput: YieldStudy, chunks: readonly YieldChunk[]): YieldResult {
  const study = parseYieldStudy(studyInput);
  const design = study.design as Design;
  const evaluator = createSpecEvaluator(design, study.mask);
  const bandsN = evaluator.ids.length;
  const layers = evaluator.layerCount;
  const ordered = [...chunks].sort((a, b) => a.startTrial - b.startTrial);
  let next = 0;
  for (const c of ordered) {
    if (c.seed !== study.seed || c.trials !== study.trials) {
      throw new RangeError(
        `chunks: chunk at trial ${c.startTrial} belongs to seed ${JSON.stringify(c.seed)} with ${c.trials} trials, not this study`,
      );
    }
    if (c.startTrial !== next) {
      throw new RangeError(`chunks: expected a chunk starting at trial ${next}, got ${c.startTrial}`);
    }
    if (
      c.bandFailures.length !== bandsN ||
      c.errorSums.q.length !== layers ||
      c.worstMargins.length !== c.count
    ) {
      throw new RangeError(
        `chunks: chunk at trial ${c.startTrial} does not match this study's bands or layers`,
      );
    }
    next += c.count;
  }
  if (next !== study.trials) throw new RangeError(`chunks: cover ${next} trials, study has ${study.trials}`);

  const n = study.trials;
  let passCount = 0;
  const bandFailures = new Array<number>(bandsN).fill(0);
  const sq = new Array<number>(layers).fill(0);
  const sq2 = new Array<number>(layers).fill(0);
  const sqf = new Array<number>(layers).fill(0);
  const sa = new Array<number>(layers).fill(0);
  const saf = new Array<number>(layers).fill(0);
  const margins: number[] = [];
  const samples: YieldChunk["envelopeSamples"] = [];
  for (const c of ordered) {
    passCount += c.passCount;
    for (let b = 0; b < bandsN; b++)
      bandFailures[b] = (bandFailures[b] as number) + (c.bandFailures[b] as number);
    for (let j = 0; j < layers; j++) {
      sq[j] = (sq[j] as number) + (c.errorSums.q[j] as number);
      sq2[j] = (sq2[j] as number) + (c.errorSums.q2[j] as number);
      sqf[j] = (sqf[j] as number) + (c.errorSums.qFail[j] as number);
      sa[j] = (sa[j] as number) + (c.errorSums.absQ[j] as number);
      saf[j] = (saf[j] as number) + (c.errorSums.absQFail[j] as number);
    }
    for (const m of c.worstMargins) margins.push(m);
    for (const s of c.envelopeSamples) samples.push(s);
  }
  samples.sort((a, b) => a.trial - b.trial);
  const fails = n - passCount;

  // Worst-margin histogram over the finite margins; edges from their range.
  const bins = study.histogramBins ?? 40;
  let lo = Infinity;
  let hi = -Infinity;
  for (const m of margins) {
    if (Number.isFinite(m)) {
      if (m < lo) lo = m;
      if (m > hi) hi = m;
    }
  }
  if (!Number.isFinite(lo)) {
    lo = 0;
    hi = 1;
  } else if (hi === lo) {
    lo -= 0.5;
    hi += 0.5;
  }
  const width = (hi - lo) / bins;
  const edges = Array.from({ length: bins + 1 }, (_, k) => (k === bins ? hi : lo + k * width));
  const counts = new Array<number>(bins).fill(0);
  for (const m of margins) {
    if (!Number.isFinite(m)) continue;
    const k = Math.min(bins - 1, Math.max(0, Math.floor((m - lo) / width)));
    counts[k] = (counts[k] as number) + 1;
  }

  // Envelopes from the sampled trials.
  const plans = planEnvelopes(evaluator);
  const ps = study.envelopePercentiles ?? [5, 50, 95];
  // No sampled spectra (envelopeSamples: 0) → no envelopes, rather than arrays of NaN that JSON would turn into null.
  const envelopes: YieldEnvelope[] = (samples.length === 0 ? [] : plans).map((plan, e) => {
    const g = evaluator.groups[plan.group] as GroupPlan;
    const column = new Float64Array(samples.length);
    const out = ps.map((p) => ({ p, values: new Array<number>(plan.wavelengths.length).fill(Number.NaN) }));
    for (let w = 0; w < plan.wavelengths.length; w++) {
      for (let s = 0; s < samples.length; s++) column[s] = samples[s]?.values[e]?.[w] ?? Number.NaN;
      column.sort();
      ps.forEach((p, k) => {
        const target = out[k];
        if (target) target.values[w] = percentileSorted(column, p);
      });
    }
    return {
      quantity: plan.quantity,
      polarization: g.polarization,
      conditions: g.conditions,
      angleDeg: g.angleDeg,
      wavelengths: plan.wavelengths,
      percentiles: out,
      sampleCount: samples.length,
    };
  });

  const criticalLayers = Array.from({ length: layers }, (_, j) => ({
    layer: j,
    correlation: correlation(n, sq[j] as number, sq2[j] as number, sqf[j] as number, fails),
    absErrorCorrelation: correlation(n, sa[j] as number, sq2[j] as number, saf[j] as number, fails),
  })).sort((a, b) => {
    const sa2 = Math.max(Math.abs(a.correlation), Math.abs(a.absErrorCorrelation));
    const sb2 = Math.max(Math.abs(b.correlation), Math.abs(b.absErrorCorrelation));
    return sb2 - sa2 || a.layer - b.layer;
  });

  const nominalBands = evaluator.evaluate(evaluator.nominalThicknesses);
  return {
    trials: n,
    seed: study.seed,
    passCount,
    yield: passCount / n,
    interval: wilsonInterval(passCount, n),
    bandFailures: evaluator.ids.map((id, i) => ({ id, count: bandFailures[i] as number })),
    marginHistogram: { edges, counts },
    envelopes,
    criticalLayers,
    nominal: {
      pass: nominalBands.every((b) => b.pass),
      merit: meritOf(evaluator, evaluator.nominalThicknesses),
    },
    errorModel: study.errorModel,
    cautions: study.mask.protective ? [PROTECTIVE_CAUTION] : [],
    warnings: [
      ...unusedErrorModelMaterials(
        study.errorModel,
        design.layers.map((l) => l.material),
      ),
      ...evaluator.warnings,
    ],
    engineVersion: ENGINE_VERSION,
  };
}

/** Split trials 0 … trials − 1 into consecutive [start, count] pieces of at most `chunkSize`. */
export function planChunks(trials: number, chunkSize: number): [number, number][] {
  if (!Number.isInteger(chunkSize) || chunkSize < 1)
    throw new RangeError(`chunkSize must be a positive integer, got ${chunkSize}`);
  const out: [number, number][] = [];
  for (let s = 0; s < trials; s += chunkSize) out.push([s, Math.min(chunkSize, trials - s)]);
  return out;
}

/** Options of {@link runYield}. */
export interface RunYieldOptions {
  /** Trials per chunk (default 200); the event loop gets a turn between chunks. */
  chunkSize?: number;
  onProgress?: (done: number, total: number) => void;
  /** Abort between chunks; the promise rejects with the signal's reason. */
  signal?: AbortSignal;
}

const yieldToEventLoop = (): Promise<void> => new Promise((resolve) => setTimeout(resolve, 0));

/** Run a whole study in chunks on the current thread, yielding between chunks and honouring `signal`. */
export async function runYield(studyInput: YieldStudy, options: RunYieldOptions = {}): Promise<YieldResult> {
  const runner = createYieldRunner(studyInput);
  const chunks: YieldChunk[] = [];
  let done = 0;
  for (const [start, count] of planChunks(runner.study.trials, options.chunkSize ?? 200)) {
    options.signal?.throwIfAborted();
    chunks.push(runner.runChunk(start, count));
    done += count;
    options.onProgress?.(done, runner.study.trials);
    await yieldToEventLoop();
  }
  options.signal?.throwIfAborted();
  return mergeYieldChunks(runner.study, chunks);
}

/** One point of a tolerance sweep. */
export interface SweepPoint {
  scale: number;
  passCount: number;
  yield: number;
  interval: ProportionInterval;
}

/**
 * Yield as every σ of the error model is multiplied by each `scale`. All scales reuse the same standard
 * draws of each trial (common random numbers), so the curve is smooth and close to monotone.
 */
export function yieldSweep(studyInput: YieldStudy, scales: readonly number[]): SweepPoint[] {
  const study = parseYieldStudy(studyInput);
  return scales.map((scale) => {
    const runner = createYieldRunner({
      ...study,
      errorModel: scaleErrorModel(study.errorModel, scale),
      envelopeSamples: 0,
    });
    let passCount = 0;
    for (const [start, count] of planChunks(study.trials, 1000))
      passCount += runner.runChunk(start, count).passCount;
    return {
      scale,
      passCount,
      yield: passCount / study.trials,
      interval: wilsonInterval(passCount, study.trials),
    };
  });
}

/**
 * Read off a sweep the largest scale whose yield reaches `target` (0–1): `scale` is the largest sampled scale
 * that reaches it (null when none does), `interpolated` the linear crossing between it and the next larger scale
 * (equal to `scale` when the largest sampled scale still reaches the target).
 */
export function largestScaleForYield(
  points: readonly SweepPoint[],
  target: number,
): { scale: number | null; interpolated: number | null } {
  if (!(target >= 0 && target <= 1)) throw new RangeError(`target yield must be in 0..1, got ${target}`);
  const sorted = [...points].sort((a, b) => a.scale - b.scale);
  let best = -1;
  sorted.forEach((p, i) => {
    if (p.yield >= target) best = i;
  });
  const at = sorted[best];
  if (!at) return { scale: null, interpolated: null };
  const after = sorted[best + 1];
  if (!after) return { scale: at.scale, interpolated: at.scale };
  const f = (at.yield - target) / (at.yield - after.yield);
  return { scale: at.scale, interpolated: at.scale + f * (after.scale - at.scale) };
}

/**
 * The nominal design's values at the wavelengths and conditions of each envelope of a yield result, in the same
 * order as {@link YieldResult.envelopes}: what a report draws inside the 5–95 % envelope of the trials. Values in
 * band units (percent, or OD); computed by the same evaluator as the trials.
 */
export function nominalEnvelopeValues(
  design: Design,
  maskInput: unknown,
): { quantity: SpecQuantity; wavelengths: number[]; values: number[] }[] {
  const evaluator = createSpecEvaluator(design, parseSpecMask(maskInput));
  evaluator.evaluate(evaluator.nominalThicknesses);
  return planEnvelopes(evaluator).map((env) => {
    const g = evaluator.groups[env.group] as GroupPlan;
    return {
      quantity: env.quantity,
      wavelengths: env.wavelengths,
      values: Array.from(env.indices, (i) =>
        quantityValue(env.quantity, g.R[i] as number, g.T[i] as number, g.A[i] as number),
      ),
    };
  });
}
