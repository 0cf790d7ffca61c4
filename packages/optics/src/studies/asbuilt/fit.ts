/**
 * As-built fit of one measured part that reports only what the measurements can tell.
 *
 * Nested models, simplest first (each starts from the previous solution):
 *   1. `tooling`        one thickness scale per material (the tooling / calibration error of a run);
 *   2. `tooling+index`  plus one refractive-index scale per material (optional);
 *   3. `layers`         plus one thickness error per layer, regularised towards the program's error model:
 *                       a maximum-a-posteriori fit with the error model's σ as a Gaussian prior (pseudo-
 *                       residuals e_j/σ_j; Tarantola, *Inverse Problem Theory*, SIAM 2005, ch. 3).
 * Built thickness of layer j: d_j (1 + t_m(j)) (1 + e_j); built index: N_j (1 + s_m(j)).
 * Per measurement k a baseline maps the model to the reading: value(λ) = a_k · model(λ + c_k) + b_k (percent),
 * with scale a, offset b (percentage points) and wavelength shift c (nm) each fitted or fixed.
 *
 * At each solution: J is the Jacobian of the weighted residuals (central differences), H = JᵀJ + P with P
 * the prior precision; posterior covariance C = s² H⁻¹ with s² = χ²/(n − p_eff) the residual variance and
 * p_eff = tr(H⁻¹ JᵀJ) the effective number of parameters (Hastie, Tibshirani & Friedman, *Elements of
 * Statistical Learning*, 2nd ed., §7.6). Models are compared by BIC = χ² + p_eff ln n (Schwarz, Ann. Stat.
 * 6:461, 1978; AIC = χ² + 2 p_eff reported too) with χ² from the stated measurement uncertainties.
 * A parameter is "not determinable" when the data shrink its prior σ by less than {@link DETERMINABLE_RATIO}
 * (posterior σ / prior σ above it) or, without a prior, when its standard error exceeds {@link MAX_FREE_SE}
 * (or it is correlated above {@link MAX_CORRELATION} with another and its standard error is not small).
 * With a process model (error-model field `process`) the priors come from it ({@link processPriors}).
 * In the per-layer model the process model is the prior of every term: tooling and index terms for which
 * it gives no σ are held at 0 there (the free tooling model competes with it through BIC).
 *
 * Global stage: before the tooling fit, a coarse scan of one common thickness scale over ±`scanSpan`
 * picks the best few minima of the misfit as starting points, because a multilayer's fringes make the
 * misfit periodic in the scale and a local fit from nominal can lock onto the wrong fringe order.
 */
import { createStackEvaluator, type Design, type StackEvaluator } from "../../core/index.ts";
import { parseErrorModel, type ErrorModel } from "../error-model.ts";
import { processErrorStats } from "../process/compare.ts";
import { ProcessModelSchema, resolveControl, type Control, type ResolvedControl } from "../process/schema.ts";
import { levenbergMarquardt } from "../least-squares.ts";
import { withThicknesses } from "../refine.ts";
import { gram, invertSpd } from "./linalg.ts";
import { DEFAULT_UNCERTAINTY_PCT, validateMeasured, type MeasuredSpectrum } from "./measurement.ts";

/** A parameter whose posterior σ is above this fraction of its prior σ is reported as not determinable. */
export const DETERMINABLE_RATIO = 0.7;
/** A parameter without a prior, correlated above this with another and with a standard error above MAX_FREE_SE/10, is not determinable. */
export const MAX_CORRELATION = 0.999;
/** A relative parameter (thickness or index scale) without a prior with a standard error above this (1 %) is not determinable. */
export const MAX_FREE_SE = 0.01;

/** A baseline term: a fixed value, or "fit". */
export type BaselineTerm = number | "fit";

/** Options of {@link fitBuiltPart}. */
export interface BuiltFitOptions {
  /** The program's process error model: the prior of the per-layer model (and of tooling / index terms). Without it the per-layer model is skipped. */
  errorModel?: ErrorModel;
  /** Also try the per-material index-scale model (default true). */
  fitIndexScale?: boolean;
  /** Also try the per-layer model (default true when an error model is given). */
  fitLayers?: boolean;
  /** Baseline per measurement: scale factor (default 1), offset in percentage points (default 0), wavelength shift in nm (default 0). */
  baseline?: { scale?: BaselineTerm; offset?: BaselineTerm; shiftNm?: BaselineTerm };
  /** Half-width of the global scan of a common thickness scale (fraction, default 0.1 = ±10 %; 0 = no scan). */
  scanSpan?: number;
  /** Number of scan minima refined by the local fit (default 3). */
  starts?: number;
  maxIterations?: number;
  /** Called with a fraction 0..1 and the stage name. */
  onProgress?: (fraction: number, stage: string) => void;
  /** Polled between model evaluations; returning true aborts the fit with an Error("fit cancelled"). */
  shouldStop?: () => boolean;
}

export type BuiltModelKind = "tooling" | "tooling+index" | "layers";

/** One fitted parameter, in its own unit: fractions for scales and errors, percentage points for offsets, nm for shifts. */
export interface FittedParameter {
  name: string;
  kind: "tooling" | "index" | "layer" | "scale" | "offset" | "shift";
  material?: string;
  layer?: number;
  measurement?: number;
  value: number;
  /** standard error (posterior, scaled by the residual variance) */
  se: number;
  /** prior 1σ, when the error model gives one */
  priorSigma?: number;
  determinable: boolean;
  /** why it is not determinable */
  reason?: string;
}

/** A layer of the fitted part (deposition order). */
export interface FittedLayer {
  index: number;
  material: string;
  nominalNm: number;
  /** fitted thickness, nm (also given when not determinable: then it is essentially the prior's value) */
  fittedNm: number;
  /** fitted / nominal − 1, percent; null when not determinable */
  errorPct: number | null;
  /** standard error of errorPct, percentage points; null when not determinable */
  sePct: number | null;
  determinable: boolean;
  reason?: string;
}

/** One fitted model of the nested sequence. */
export interface BuiltModelResult {
  kind: BuiltModelKind;
  parameters: FittedParameter[];
  layers: FittedLayer[];
  /** Σ ((model − measured)/uncertainty)² over all points */
  chiSquare: number;
  /** χ² / (n − p_eff): 1 when the model explains the data to within the stated uncertainties */
  residualVariance: number;
  /** RMS of model − measured over all points, percentage points */
  residualRmsPct: number;
  effectiveParameters: number;
  aic: number;
  bic: number;
  /** correlation matrix of the parameters (row-major, parameters.length²) */
  correlation: number[];
  /** model spectra at the measurement wavelengths, percent (with the baseline applied) */
  fitted: number[][];
  iterations: number;
}

/** Result of {@link fitBuiltPart}. */
export interface BuiltFitResult {
  models: BuiltModelResult[];
  /** index into `models` of the chosen model */
  chosen: number;
  /** why the chosen model (the information criteria compared) */
  reason: string;
  /** the chosen model's layers */
  layers: FittedLayer[];
  /** the design with the chosen model's thicknesses */
  design: Design;
  /** points in all measurements */
  points: number;
  warnings: string[];
}

interface Param {
  name: string;
  kind: FittedParameter["kind"];
  material?: string;
  layer?: number;
  measurement?: number;
  prior?: number;
  lower: number;
  upper: number;
  step: number;
}

class Cancelled extends Error {
  constructor() {
    super("fit cancelled");
    this.name = "AbortError";
  }
}

/** A forward model of several measurements of one part, with evaluators cached per wavelength shift. */
class Forward {
  readonly L: number;
  readonly nominal: Float64Array;
  readonly layerMaterial: string[];
  readonly materials: string[];
  private readonly cache: { shift: number; ev: StackEvaluator }[][];
  private readonly thick: Float64Array;
  private readonly scale: Float64Array;
  private readonly outs: { R: Float64Array; T: Float64Array; A: Float64Array }[];
  readonly offsets: number[];
  readonly n: number;

  constructor(
    readonly design: Design,
    readonly ms: MeasuredSpectrum[],
  ) {
    const ev = createStackEvaluator(design, {
      wavelengths: Float64Array.from(ms[0]!.wavelengths),
      angleDeg: ms[0]!.angleDeg,
      polarization: ms[0]!.polarization,
    });
    this.L = ev.layerCount;
    this.nominal = Float64Array.from(ev.nominalThicknesses);
    this.layerMaterial = design.layers.map((l) => l.material);
    this.materials = [...new Set(design.layers.filter((l) => l.thickness > 0).map((l) => l.material))].sort();
    this.cache = ms.map((_, k) => (k === 0 ? [{ shift: 0, ev }] : []));
    this.thick = new Float64Array(this.L);
    this.scale = new Float64Array(this.L);
    this.outs = ms.map((m) => ({
      R: new Float64Array(m.wavelengths.length),
      T: new Float64Array(m.wavelengths.length),
      A: new Float64Array(m.wavelengths.length),
    }));
    this.offsets = [];
    let n = 0;
    for (const m of ms) {
      this.offsets.push(n);
      n += m.wavelengths.length;
    }
    this.n = n;
  }

  private evaluator(k: number, shift: number): StackEvaluator {
    const list = this.cache[k]!;
    const hit = list.find((e) => e.shift === shift);
    if (hit) return hit.ev;
    const m = this.ms[k]!;
    const wl = Float64Array.from(m.wavelengths, (w) => w + shift);
    const ev = createStackEvaluator(this.design, {
      wavelengths: wl,
      angleDeg: m.angleDeg,
      polarization: m.polarization,
    });
    list.unshift({ shift, ev });
    if (list.length > 4) list.pop();
    return ev;
  }

  /**
   * Model values (percent, baseline applied) into `out` (length n) for thickness factors `tf` and index
   * factors `nf` per layer, and per-measurement baseline (a, b, c).
   */
  run(tf: Float64Array, nf: Float64Array | null, base: Float64Array, out: Float64Array): void {
    for (let j = 0; j < this.L; j++) this.thick[j] = (this.nominal[j] as number) * (tf[j] as number);
    if (nf) this.scale.set(nf);
    for (let k = 0; k < this.ms.length; k++) {
      const m = this.ms[k]!;
      const a = base[3 * k] as number;
      const b = base[3 * k + 1] as number;
      const c = base[3 * k + 2] as number;
      const o = this.outs[k]!;
      this.evaluator(k, c).evaluate(this.thick, o, nf ? this.scale : undefined);
      const q = m.quantity === "R" ? o.R : o.T;
      const off = this.offsets[k] as number;
      for (let i = 0; i < q.length; i++) out[off + i] = a * (q[i] as number) * 100 + b;
    }
  }
}

/**
 * Priors of the as-built fit from a process model (the error model's `thickness` and `systematicPct` are not used
 * with a process): per material the run-level σ as the tooling prior (crystal tooling, time rate error) and per
 * layer the σ of its own error — crystal noise and termination/d; time drift, within-layer and shutter/d (the
 * drift's correlation between layers is not part of a per-layer prior); optical monitoring the layer's σ from
 * processErrorStats (2000 trials, fixed seed), which includes what the cuts carry from the layers below.
 * Fractions of the nominal thickness.
 */
export function processPriors(
  design: Design,
  errorModel: ErrorModel,
): { layer: number[]; tooling: Record<string, number> } {
  const process = ProcessModelSchema.parse(errorModel.process);
  const controlOf = (m: string): ResolvedControl | null => {
    if ("method" in process.control) return resolveControl(process.control as Control);
    const c = (process.control as Record<string, Control>)[m];
    return c ? resolveControl(c) : null;
  };
  const optical = design.layers.some((l) => controlOf(l.material)?.method === "optical")
    ? processErrorStats(design, errorModel, 2000, "as-built prior")
    : null;
  const tooling: Record<string, number> = {};
  const layer = design.layers.map((l, j) => {
    const c = controlOf(l.material);
    const d = l.thickness;
    if (!c || !(d > 0)) return 0;
    if (c.method === "crystal") {
      tooling[l.material] = c.toolingPct / 100;
      return Math.hypot(c.noisePct / 100, c.terminationNm / d);
    }
    if (c.method === "time") {
      tooling[l.material] = c.rateErrorPct / 100;
      return Math.hypot(c.rateDriftPct / 100, c.withinLayerPct / 100, c.shutterNm / d);
    }
    return (optical?.[j]?.sigmaPct ?? 0) / 100;
  });
  return { layer, tooling };
}

const sigmaOf = (v: ErrorModel["systematicPct"], m: string): number =>
  v === undefined ? 0 : typeof v === "number" ? v / 100 : (v[m] ?? 0) / 100;

/**
 * Fit one built part against one or several of its measurements (R and T, angles, polarizations, each with
 * its own uncertainty) with the nested models described above, and choose the model by BIC.
 * Throws RangeError naming the offending value for bad input.
 */
export function fitBuiltPart(
  design: Design,
  measurements: MeasuredSpectrum[],
  options: BuiltFitOptions = {},
): BuiltFitResult {
  if (!Array.isArray(measurements) || measurements.length === 0)
    throw new RangeError(
      `measurements: expected at least one measured spectrum, got ${measurements?.length ?? 0}`,
    );
  measurements.forEach((m, k) => validateMeasured(m, `measurements[${k}]`));
  const errorModel = options.errorModel ? parseErrorModel(options.errorModel) : undefined;
  const scanSpan = options.scanSpan ?? 0.1;
  if (!(scanSpan >= 0 && scanSpan < 0.5))
    throw new RangeError(`scanSpan: expected a fraction in [0, 0.5), got ${scanSpan}`);
  const starts = options.starts ?? 3;
  if (!Number.isInteger(starts) || starts < 1 || starts > 20)
    throw new RangeError(`starts: expected an integer 1..20, got ${starts}`);
  const fwd = new Forward(design, measurements);
  const warnings: string[] = [];
  const L = fwd.L;
  const K = measurements.length;
  const target = new Float64Array(fwd.n);
  const weight = new Float64Array(fwd.n);
  measurements.forEach((m, k) => {
    const u = m.uncertaintyPct ?? DEFAULT_UNCERTAINTY_PCT;
    const off = fwd.offsets[k] as number;
    for (let i = 0; i < m.values.length; i++) {
      target[off + i] = m.values[i] as number;
      weight[off + i] = 1 / u;
    }
  });
  const baseline = options.baseline ?? {};
  const fixedBase = new Float64Array(3 * K);
  const termValue = (t: BaselineTerm | undefined, def: number, what: string): number => {
    if (t === undefined || t === "fit") return def;
    if (!Number.isFinite(t))
      throw new RangeError(`baseline.${what}: expected a number or "fit", got ${String(t)}`);
    return t;
  };
  for (let k = 0; k < K; k++) {
    fixedBase[3 * k] = termValue(baseline.scale, 1, "scale");
    fixedBase[3 * k + 1] = termValue(baseline.offset, 0, "offset");
    fixedBase[3 * k + 2] = termValue(baseline.shiftNm, 0, "shiftNm");
  }
  if (typeof baseline.scale === "number" && !(baseline.scale > 0))
    throw new RangeError(`baseline.scale: expected a factor > 0, got ${baseline.scale}`);
  const baseParams: Param[] = [];
  for (let k = 0; k < K; k++) {
    if (baseline.scale === "fit")
      baseParams.push({
        name: `scale[${k}]`,
        kind: "scale",
        measurement: k,
        lower: -0.3,
        upper: 0.3,
        step: 1e-5,
      });
    if (baseline.offset === "fit")
      baseParams.push({
        name: `offset[${k}]`,
        kind: "offset",
        measurement: k,
        lower: -20,
        upper: 20,
        step: 1e-3,
      });
    if (baseline.shiftNm === "fit")
      baseParams.push({
        name: `shift[${k}]`,
        kind: "shift",
        measurement: k,
        lower: -20,
        upper: 20,
        step: 1e-3,
      });
  }
  const mats = fwd.materials;
  const fromProcess = errorModel?.process ? processPriors(design, errorModel) : null;
  const layerPrior = (j: number): number => {
    if (!errorModel) return 0;
    if (fromProcess) return fromProcess.layer[j] ?? 0;
    const d = fwd.nominal[j] as number;
    const rd = (errorModel.thickness.relativePct / 100) * d;
    const s = Math.sqrt(rd * rd + errorModel.thickness.absoluteNm ** 2);
    return d > 0 ? s / d : 0;
  };
  const toolingParams = (): Param[] =>
    mats.map((m) => {
      const s = fromProcess
        ? (fromProcess.tooling[m] ?? 0)
        : errorModel
          ? sigmaOf(errorModel.systematicPct, m)
          : 0;
      return {
        name: `tooling ${m}`,
        kind: "tooling",
        material: m,
        ...(s > 0 ? { prior: s } : {}),
        lower: -0.4,
        upper: 0.4,
        step: 1e-6,
      };
    });
  const indexParams = (): Param[] =>
    mats.map((m) => {
      const s = errorModel ? sigmaOf(errorModel.indexDriftPct, m) : 0;
      return {
        name: `index ${m}`,
        kind: "index",
        material: m,
        ...(s > 0 ? { prior: s } : {}),
        lower: -0.2,
        upper: 0.2,
        step: 1e-6,
      };
    });
  const layerParams = (): Param[] => {
    const out: Param[] = [];
    for (let j = 0; j < L; j++) {
      if (!((fwd.nominal[j] as number) > 0)) continue;
      const prior = layerPrior(j);
      if (!(prior > 0)) continue;
      out.push({
        name: `layer ${j + 1}`,
        kind: "layer",
        layer: j,
        material: fwd.layerMaterial[j],
        prior,
        lower: -0.4,
        upper: 0.4,
        step: 1e-6,
      });
    }
    return out;
  };

  const fitLayers = (options.fitLayers ?? true) && errorModel !== undefined;
  if ((options.fitLayers ?? true) && !errorModel)
    warnings.push(
      "No error model given: the per-layer model (which needs the process model as its prior) was skipped.",
    );
  const wantIndex = options.fitIndexScale ?? true;
  const stagesTotal = 1 + 1 + (wantIndex ? 1 : 0) + (fitLayers ? 1 : 0);
  let stage = 0;
  const progress = (label: string): void => {
    options.onProgress?.(Math.min(1, stage / stagesTotal), label);
  };
  const modelOut = new Float64Array(fwd.n);
  const tf = new Float64Array(L);
  const nf = new Float64Array(L);
  const base = new Float64Array(3 * K);

  /** Map a parameter vector to thickness factors, index factors, baseline. */
  const apply = (params: Param[], x: ArrayLike<number>): boolean => {
    tf.fill(1);
    nf.fill(1);
    base.set(fixedBase);
    let anyIndex = false;
    const tool = new Map<string, number>();
    const idx = new Map<string, number>();
    params.forEach((p, i) => {
      const v = x[i] as number;
      if (p.kind === "tooling") tool.set(p.material!, v);
      else if (p.kind === "index") {
        idx.set(p.material!, v);
        anyIndex = true;
      } else if (p.kind === "layer") tf[p.layer!] = 1 + v;
      else if (p.kind === "scale") base[3 * p.measurement!] = 1 + v;
      else if (p.kind === "offset") base[3 * p.measurement! + 1] = v;
      else base[3 * p.measurement! + 2] = v;
    });
    for (let j = 0; j < L; j++) {
      const m = fwd.layerMaterial[j]!;
      tf[j] = (tf[j] as number) * (1 + (tool.get(m) ?? 0));
      nf[j] = 1 + (idx.get(m) ?? 0);
    }
    return anyIndex;
  };
  const residualsFor = (params: Param[]) => {
    const priors = params.map((p, i) => [i, p.prior ?? 0] as const).filter(([, s]) => s > 0);
    return {
      count: fwd.n + priors.length,
      fn: (x: Float64Array, res: Float64Array): void => {
        if (options.shouldStop?.()) throw new Cancelled();
        const withIndex = apply(params, x);
        fwd.run(tf, withIndex ? nf : null, base, modelOut);
        for (let i = 0; i < fwd.n; i++)
          res[i] = ((modelOut[i] as number) - (target[i] as number)) * (weight[i] as number);
        priors.forEach(([i, s], q) => (res[fwd.n + q] = (x[i] as number) / s));
      },
    };
  };
  const lm = (params: Param[], x0: ArrayLike<number>) => {
    const r = residualsFor(params);
    return levenbergMarquardt(
      {
        parameterCount: params.length,
        residualCount: r.count,
        residuals: r.fn,
        lower: Float64Array.from(params, (p) => p.lower),
        upper: Float64Array.from(params, (p) => p.upper),
        steps: Float64Array.from(params, (p) => p.step),
      },
      x0,
      { maxIterations: options.maxIterations ?? 60, relativeTolerance: 1e-10 },
    );
  };

  /** Statistics at a solution. */
  const analyse = (
    kind: BuiltModelKind,
    params: Param[],
    x: Float64Array,
    iterations: number,
  ): BuiltModelResult => {
    const P = params.length;
    const n = fwd.n;
    const r = residualsFor(params);
    const res0 = new Float64Array(r.count);
    r.fn(x, res0);
    let chi2 = 0;
    let rss = 0;
    for (let i = 0; i < n; i++) {
      chi2 += (res0[i] as number) ** 2;
      rss += ((res0[i] as number) / (weight[i] as number)) ** 2;
    }
    const fittedFlat = new Float64Array(n);
    fittedFlat.set(modelOut);
    // central-difference Jacobian of the weighted data residuals
    const J = new Float64Array(n * P);
    const xp = new Float64Array(x);
    const rp = new Float64Array(r.count);
    const rm = new Float64Array(r.count);
    for (let a = 0; a < P; a++) {
      const h = (params[a]!.step as number) * 10;
      xp.set(x);
      xp[a] = (x[a] as number) + h;
      r.fn(xp, rp);
      xp[a] = (x[a] as number) - h;
      r.fn(xp, rm);
      for (let i = 0; i < n; i++) J[i * P + a] = ((rp[i] as number) - (rm[i] as number)) / (2 * h);
    }
    const JtJ = gram(J, n, P);
    const H = new Float64Array(JtJ);
    params.forEach((p, a) => {
      if (p.prior) H[a * P + a] = (H[a * P + a] as number) + 1 / p.prior ** 2;
    });
    let Hinv = invertSpd(H, P);
    if (!Hinv) {
      // a direction the data do not see and no prior holds: regularise minimally so the rest can be reported
      for (let a = 0; a < P; a++) H[a * P + a] = (H[a * P + a] as number) * (1 + 1e-10) + 1e-12;
      Hinv = invertSpd(H, P) ?? new Float64Array(P * P).fill(NaN);
      warnings.push(`${kind}: the fit matrix is singular; some parameters are not determined at all.`);
    }
    let pEff = 0;
    for (let a = 0; a < P; a++)
      for (let b = 0; b < P; b++) pEff += (Hinv[a * P + b] as number) * (JtJ[b * P + a] as number);
    const dof = Math.max(1, n - pEff);
    const s2 = chi2 / dof;
    // covariance scaled by the residual variance, never below what the stated uncertainties imply
    const scale2 = Math.max(1, s2);
    const corr: number[] = new Array(P * P).fill(0);
    for (let a = 0; a < P; a++)
      for (let b = 0; b < P; b++) {
        const d = Math.sqrt((Hinv[a * P + a] as number) * (Hinv[b * P + b] as number));
        corr[a * P + b] = d > 0 ? (Hinv[a * P + b] as number) / d : 0;
      }
    const parameters: FittedParameter[] = params.map((p, a) => {
      const postUnscaled = Math.sqrt(Hinv[a * P + a] as number);
      const se = Math.sqrt(scale2) * postUnscaled;
      let maxCorr = 0;
      let partner = -1;
      for (let b = 0; b < P; b++) {
        if (b === a) continue;
        const c = Math.abs(corr[a * P + b] as number);
        if (c > maxCorr) {
          maxCorr = c;
          partner = b;
        }
      }
      let reason: string | undefined;
      if (!Number.isFinite(se)) reason = "the measurements carry no information on it";
      else if (p.prior) {
        const ratio = postUnscaled / p.prior;
        if (ratio > DETERMINABLE_RATIO)
          reason = `the measurements narrow its prior σ only to ${(ratio * 100).toFixed(0)} % of the process model's`;
      } else if (p.kind === "tooling" || p.kind === "index" || p.kind === "scale") {
        if (se > MAX_FREE_SE) reason = `its standard error (${(se * 100).toFixed(2)} %) is too large to tell`;
        else if (maxCorr > MAX_CORRELATION && se > MAX_FREE_SE / 10)
          reason = `correlated ${(maxCorr * 100).toFixed(1)} % with ${params[partner]!.name}`;
      }
      return {
        name: p.name,
        kind: p.kind,
        ...(p.material !== undefined ? { material: p.material } : {}),
        ...(p.layer !== undefined ? { layer: p.layer } : {}),
        ...(p.measurement !== undefined ? { measurement: p.measurement } : {}),
        value: x[a] as number,
        se,
        ...(p.prior ? { priorSigma: p.prior } : {}),
        determinable: reason === undefined,
        ...(reason ? { reason } : {}),
      };
    });
    // layers: error = (1 + t)(1 + e) − 1, variance by the delta method
    const idxOf = new Map(
      params.map((p, a) => [p.kind === "layer" ? `L${p.layer}` : `${p.kind}:${p.material}`, a]),
    );
    apply(params, x);
    const layers: FittedLayer[] = [];
    for (let j = 0; j < L; j++) {
      const d = fwd.nominal[j] as number;
      const m = fwd.layerMaterial[j]!;
      const a = idxOf.get(`tooling:${m}`);
      const e = idxOf.get(`L${j}`);
      const tv = a !== undefined ? (x[a] as number) : 0;
      const ev = e !== undefined ? (x[e] as number) : 0;
      const err = (1 + tv) * (1 + ev) - 1;
      const g: [number, number][] = [];
      if (a !== undefined) g.push([a, 1 + ev]);
      if (e !== undefined) g.push([e, 1 + tv]);
      let v = 0;
      for (const [p, gp] of g) for (const [q, gq] of g) v += gp * gq * (Hinv[p * P + q] as number);
      const se = Math.sqrt(scale2 * v);
      let reason: string | undefined;
      if (!(d > 0)) reason = "zero nominal thickness";
      else if (e !== undefined) reason = parameters[e]!.reason;
      else if (a !== undefined) reason = parameters[a]!.reason;
      else reason = "not fitted";
      const ok = reason === undefined;
      layers.push({
        index: j,
        material: m,
        nominalNm: d,
        fittedNm: d * (tf[j] as number),
        errorPct: ok ? err * 100 : null,
        sePct: ok ? se * 100 : null,
        determinable: ok,
        ...(reason ? { reason } : {}),
      });
    }
    const fitted = measurements.map((m, k) => {
      const off = fwd.offsets[k] as number;
      return Array.from(fittedFlat.subarray(off, off + m.values.length));
    });
    return {
      kind,
      parameters,
      layers,
      chiSquare: chi2,
      residualVariance: s2,
      residualRmsPct: Math.sqrt(rss / n),
      effectiveParameters: pEff,
      aic: chi2 + 2 * pEff,
      bic: chi2 + pEff * Math.log(n),
      correlation: corr,
      fitted,
      iterations,
    };
  };

  // ---- stage 1: global scan of a common thickness scale, then the tooling model from the best minima
  progress("scan");
  const p1 = [...toolingParams(), ...baseParams];
  const x1start = new Float64Array(p1.length);
  const startsList: number[] = [0];
  if (scanSpan > 0) {
    const stepsN = Math.max(8, Math.round(scanSpan / 0.0025));
    const costs: number[] = [];
    const gs: number[] = [];
    const r = residualsFor(p1);
    const res = new Float64Array(r.count);
    for (let s = -stepsN; s <= stepsN; s++) {
      const g = (s / stepsN) * scanSpan;
      x1start.fill(0);
      p1.forEach((p, i) => {
        if (p.kind === "tooling") x1start[i] = g;
      });
      r.fn(x1start, res);
      let c = 0;
      for (let i = 0; i < res.length; i++) c += (res[i] as number) ** 2;
      costs.push(c);
      gs.push(g);
    }
    const minima: number[] = [];
    for (let i = 0; i < costs.length; i++) {
      const c = costs[i] as number;
      if (
        (i === 0 || c <= (costs[i - 1] as number)) &&
        (i === costs.length - 1 || c <= (costs[i + 1] as number))
      )
        minima.push(i);
    }
    minima.sort((a, b) => (costs[a] as number) - (costs[b] as number));
    startsList.length = 0;
    for (const i of minima.slice(0, starts)) startsList.push(gs[i] as number);
    if (!startsList.includes(0)) startsList.push(0);
  }
  stage = 1;
  progress("tooling");
  let best: ReturnType<typeof lm> | null = null;
  for (const g of startsList) {
    x1start.fill(0);
    p1.forEach((p, i) => {
      if (p.kind === "tooling") x1start[i] = g;
    });
    const f = lm(p1, x1start);
    if (!best || f.cost < best.cost) best = f;
  }
  const models: BuiltModelResult[] = [analyse("tooling", p1, best!.x, best!.iterations)];
  let prevParams = p1;
  let prevX = best!.x;
  stage = 2;

  const carry = (params: Param[]): Float64Array => {
    const x = new Float64Array(params.length);
    params.forEach((p, i) => {
      const j = prevParams.findIndex((q) => q.name === p.name);
      if (j >= 0) x[i] = prevX[j] as number;
    });
    return x;
  };

  // ---- stage 2: plus index scale per material
  if (wantIndex) {
    progress("tooling+index");
    const p2 = [...toolingParams(), ...indexParams(), ...baseParams];
    const f = lm(p2, carry(p2));
    const m2 = analyse("tooling+index", p2, f.x, f.iterations);
    models.push(m2);
    if (m2.bic < models[0]!.bic) {
      prevParams = p2;
      prevX = f.x;
    }
    stage++;
  }

  // ---- stage 3: plus per-layer errors with the process model as prior
  if (fitLayers) {
    progress("layers");
    // the process model is the prior of every term: tooling and index terms without a σ in it stay at 0
    const p3 = [
      ...toolingParams().filter((p) => p.prior),
      ...indexParams().filter((p) => p.prior),
      ...layerParams(),
      ...baseParams,
    ];
    const f = lm(p3, carry(p3));
    models.push(analyse("layers", p3, f.x, f.iterations));
    stage++;
  }
  stage = stagesTotal;
  progress("done");

  let chosen = 0;
  models.forEach((m, i) => {
    if (m.bic < models[chosen]!.bic) chosen = i;
  });
  const c = models[chosen]!;
  const others = models
    .filter((_, i) => i !== chosen)
    .map((m) => `${m.kind} ${m.bic.toFixed(1)} (Δ ${(m.bic - c.bic).toFixed(1)})`)
    .join(", ");
  const reason =
    `Lowest BIC: ${c.kind} ${c.bic.toFixed(1)} with ${c.effectiveParameters.toFixed(1)} effective parameters` +
    (others ? `; ${others}` : "") +
    `. χ²/dof = ${c.residualVariance.toFixed(2)}` +
    (c.residualVariance > 4
      ? " — the model does not explain the measurement to within its stated uncertainty."
      : ".");
  if (c.residualVariance > 4)
    warnings.push(
      `The chosen model leaves χ²/dof = ${c.residualVariance.toFixed(1)}: a structure, material or baseline not in the model, or an understated uncertainty.`,
    );
  return {
    models,
    chosen,
    reason,
    layers: c.layers,
    design: withThicknesses(
      design,
      c.layers.map((l) => l.fittedNm),
    ),
    points: fwd.n,
    warnings,
  };
}
