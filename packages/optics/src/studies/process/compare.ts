/**
 * Results that answer "which process reaches the target?": yield of one design and spec under several
 * process models side by side, per-layer statistics of the realised thickness errors, monitoring traces
 * of one sample build, and the yield across the plate.
 */
import { parseDesign } from "../../core/index.ts";
import type { Design } from "../../core/index.ts";
import type { ErrorModel } from "../error-model.ts";
import { parseErrorModel } from "../error-model.ts";
import { createYieldRunner, parseYieldStudy, planChunks, runYield } from "../montecarlo.ts";
import type { YieldResult, YieldStudy } from "../montecarlo.ts";
import { TrialRandom } from "../random.ts";
import { wilsonInterval } from "../wilson.ts";
import type { ProportionInterval } from "../wilson.ts";
import { createProcessSampler, createStudySampler } from "./sampler.ts";
import type { MonitoringTrace } from "./sampler.ts";
import { describeProcess, ProcessModelSchema } from "./schema.ts";
import type { ProcessModelInput } from "./schema.ts";

/** Realised relative thickness error of one layer over many builds, in % of the nominal thickness. */
export interface LayerErrorStats {
  layer: number;
  material: string;
  /** mean and standard deviation (population) of 100·(d′/d − 1), % */
  meanPct: number;
  sigmaPct: number;
  /** Pearson correlation of this layer's error with the previous layer's (0 for layer 0) */
  correlationWithPrevious: number;
}

/**
 * Per-layer statistics of the realised relative thickness error over trials 0 … trials − 1 of `seed`
 * (no spectra are computed: only the sampler runs). Sums are taken in trial order, so the figures
 * depend only on (model, design, trials, seed).
 */
export function processErrorStats(
  designInput: Design,
  errorModelInput: ErrorModel,
  trials: number,
  seed: string,
): LayerErrorStats[] {
  if (!Number.isInteger(trials) || trials < 2 || trials > 1_000_000)
    throw new RangeError(`trials must be an integer in 2..1000000, got ${trials}`);
  const design = parseDesign(designInput);
  const model = parseErrorModel(errorModelInput);
  const sampler = createStudySampler(model, design);
  const L = design.layers.length;
  const nominal = Float64Array.from(design.layers, (l) => l.thickness);
  const th = new Float64Array(L);
  const sc = new Float64Array(L);
  const e = new Float64Array(L);
  const s1 = new Float64Array(L);
  const s2 = new Float64Array(L);
  const sp = new Float64Array(L);
  const rng = new TrialRandom();
  for (let t = 0; t < trials; t++) {
    sampler.sample(rng, seed, t, nominal, th, sc);
    for (let j = 0; j < L; j++) {
      const d = nominal[j] as number;
      const x = d > 0 ? (th[j] as number) / d - 1 : 0;
      e[j] = x;
      s1[j] = (s1[j] as number) + x;
      s2[j] = (s2[j] as number) + x * x;
      if (j > 0) sp[j] = (sp[j] as number) + x * (e[j - 1] as number);
    }
  }
  return design.layers.map((l, j) => {
    const mean = (s1[j] as number) / trials;
    const variance = Math.max(0, (s2[j] as number) / trials - mean * mean);
    let corr = 0;
    if (j > 0) {
      const mp = (s1[j - 1] as number) / trials;
      const vp = Math.max(0, (s2[j - 1] as number) / trials - mp * mp);
      const cov = (sp[j] as number) / trials - mean * mp;
      corr = variance > 0 && vp > 0 ? Math.max(-1, Math.min(1, cov / Math.sqrt(variance * vp))) : 0;
    }
    return {
      layer: j,
      material: l.material,
      meanPct: 100 * mean,
      sigmaPct: 100 * Math.sqrt(variance),
      correlationWithPrevious: corr,
    };
  });
}

/** One process in a comparison. */
export interface ProcessComparisonEntry {
  /** the process's label, or its plain-words description */
  label: string;
  description: string;
  errorModel: ErrorModel;
  result: YieldResult;
  layers: LayerErrorStats[];
}

/** Options of {@link compareProcesses}. */
export interface CompareProcessesOptions {
  chunkSize?: number;
  /** trials for the per-layer error statistics (default: the study's trials, at most 20000) */
  statsTrials?: number;
  onProgress?: (done: number, total: number) => void;
  signal?: AbortSignal;
}

/**
 * Yield of the same design and spec under each process (same trial count and seed), side by side,
 * with per-layer error statistics. `null` in the list stands for the study's own error model without a
 * process (the independent-error model). The study's index terms apply to every entry.
 */
export async function compareProcesses(
  studyInput: YieldStudy,
  processes: readonly (ProcessModelInput | null)[],
  options: CompareProcessesOptions = {},
): Promise<ProcessComparisonEntry[]> {
  const study = parseYieldStudy(studyInput);
  if (processes.length < 1 || processes.length > 12)
    throw new RangeError(`processes: expected 1 to 12 process models, got ${processes.length}`);
  const models: ErrorModel[] = processes.map((p, i) => {
    const base: ErrorModel = { ...study.errorModel };
    delete base.process;
    if (p === null) return base;
    try {
      return { ...base, process: ProcessModelSchema.parse(p) };
    } catch {
      throw new RangeError(`processes[${i}]: not a valid process model`);
    }
  });
  const statsTrials = options.statsTrials ?? Math.min(study.trials, 20000);
  const total = models.length * study.trials;
  const out: ProcessComparisonEntry[] = [];
  for (let i = 0; i < models.length; i++) {
    const errorModel = models[i] as ErrorModel;
    const result = await runYield(
      { ...study, errorModel },
      {
        chunkSize: options.chunkSize ?? 200,
        ...(options.signal ? { signal: options.signal } : {}),
        onProgress: (done) => options.onProgress?.(i * study.trials + done, total),
      },
    );
    options.signal?.throwIfAborted();
    const description = describeProcess(errorModel);
    out.push({
      label: errorModel.process?.label ?? (errorModel.process ? description : "independent errors"),
      description,
      errorModel,
      result,
      layers: processErrorStats(study.design as Design, errorModel, Math.max(2, statsTrials), study.seed),
    });
  }
  return out;
}

/**
 * Monitoring traces of one sample build: trial `trial` of `seed` under `errorModel` (which must carry
 * a process), `points` samples per optically monitored layer. Also returns that build's thicknesses.
 */
export function monitoringTraces(
  designInput: Design,
  errorModelInput: ErrorModel,
  seed: string,
  trial = 0,
  points = 120,
): { traces: MonitoringTrace[]; thicknesses: number[]; indexScale: number[] } {
  if (!Number.isInteger(trial) || trial < 0) throw new RangeError(`trial must be an integer ≥ 0, got ${trial}`);
  const design = parseDesign(designInput);
  const sampler = createProcessSampler(parseErrorModel(errorModelInput), design);
  return sampler.traces(new TrialRandom(), seed, trial, points);
}

/** Yield at one radius on the plate. */
export interface PlatePoint {
  radiusMm: number;
  passCount: number;
  yield: number;
  interval: ProportionInterval;
}

/**
 * Yield across the plate: the study (whose error model must carry a process with `uniformity`) run
 * with the part fixed at each radius in turn (same seed and trials, so the same run draws).
 */
export function plateYield(studyInput: YieldStudy, radiiMm: readonly number[]): PlatePoint[] {
  const study = parseYieldStudy(studyInput);
  const process = study.errorModel.process;
  if (!process?.uniformity)
    throw new RangeError("study.errorModel.process.uniformity: needed for the yield across the plate, got nothing");
  const uniformity = process.uniformity;
  return radiiMm.map((r) => {
    if (!(r >= 0 && r <= 5000)) throw new RangeError(`radius must be in 0..5000 mm, got ${r}`);
    const runner = createYieldRunner({
      ...study,
      errorModel: { ...study.errorModel, process: { ...process, uniformity: { ...uniformity, radiusMm: r } } },
      envelopeSamples: 0,
    });
    let passCount = 0;
    for (const [start, count] of planChunks(study.trials, 1000)) passCount += runner.runChunk(start, count).passCount;
    return { radiusMm: r, passCount, yield: passCount / study.trials, interval: wilsonInterval(passCount, study.trials) };
  });
}
