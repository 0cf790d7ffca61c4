/**
 * Calibration of the program's process model (error-model field `process`) from the fitted per-layer thickness
 * errors of many runs: the parameters each control method makes identifiable, with 95 % intervals, and the
 * program's process model with the calibrated numbers ("adopt as the new error model").
 *
 * Data: per run, the fitted relative error of each determinable layer (percent, with its standard error s) at its
 * deposition position p in its design. Parts of one run are averaged layer by layer first (they share the run's
 * deposition; s² divided by the number of parts). Known per-layer terms of the program's model that these fits
 * cannot separate from the relative ones (crystal `terminationNm`, time `shutterNm`: σ = nm / d) are kept and
 * subtracted like the fits' own variance.
 *
 * - Quartz crystal (per material, or pooled over materials when one control serves all): error e = t_run + ε.
 *   Per-layer noise σ² = SS_within/ν − mean(s² + term²/d²), ν = Σ (n_r − 1) (deviations from the run mean);
 *   tooling σ² = SS_runmeans/(R − 1) − mean((σ_noise² + s̄² + term²)/n_r). 95 % intervals from the chi-square
 *   distribution of SS/σ² with ν degrees of freedom (NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.5.8),
 *   the measurement part subtracted from both limits.
 * - Time / rate (same grouping): e = u_run + x_p + w, u ~ N(0, σ_u²) the rate error of the run, x a stationary
 *   first-order autoregressive drift stepped once per deposited layer, Cov(x_p, x_q) = σ_x² ρ^|p−q|, w ~ N(0, σ_w²)
 *   within the layer. Within a run and material, deviations from the material's mean over all runs give the
 *   empirical covariance at each lag h of deposition positions: C(h) = σ_u² + σ_x² ρ^h (h ≥ 1) and C(0) = σ_u² +
 *   σ_x² + σ_w² + s² + shutter²/d². (σ_u², σ_x², ρ) are fitted to C(h) by weighted least squares (pair counts as
 *   weights; ρ profiled on a grid, the two variances non-negative), σ_w² from C(0). This needs layers of a material
 *   at three or more different lags; otherwise ρ is held at the program's value (noted). Intervals: a parametric
 *   bootstrap (Efron & Tibshirani, An Introduction to the Bootstrap, 1993: the same runs, positions and s
 *   re-simulated from the estimates, `bootstrap` replicates, seeded) gives the sampling variance of each estimate;
 *   σ intervals are chi-square intervals with Satterthwaite's effective degrees of freedom ν = 2σ̂⁴/Var(σ̂²)
 *   (Satterthwaite, Biometrics Bulletin 2:110, 1946), ρ's is Fisher's z interval tanh(atanh ρ̂ ± 1.96·SE_z)
 *   (Fisher, Biometrika 10:507, 1915) with SE_z the bootstrap standard deviation of atanh ρ. Where an estimate
 *   sits at 0 (or ν < 2) the bootstrap percentile interval is given instead.
 * - Optical monitoring: the errors depend on the design and plan, so the check is per layer: the realised σ of
 *   each layer over the runs of one design (chi-square interval, ν = R − 1) against the model's prediction
 *   (`processErrorStats`). One scale s multiplies the optical spreads (photometric noise, detection threshold,
 *   gain drift, overshoot σ); it is solved (secant iterations on `processErrorStats`) so that the model's pooled
 *   variance over the checked layers equals the realised one; its interval maps a chi-square interval of the
 *   realised-to-predicted variance ratio (Satterthwaite's effective degrees of freedom from a bootstrap over runs,
 *   which keeps the correlation of layers within a run) through the same solve.
 */
import type { Design } from "../../core/index.ts";
import type { ErrorModel } from "../error-model.ts";
import { parseErrorModel } from "../error-model.ts";
import { processErrorStats } from "../process/compare.ts";
import { ProcessModelSchema, resolveControl } from "../process/schema.ts";
import type { Control, OpticalControl, ProcessModel, ResolvedControl } from "../process/schema.ts";
import { TrialRandom } from "../random.ts";
import { Z_95 } from "../wilson.ts";
import { chiSquareQuantile, type CalibrationPart } from "./calibrate.ts";

/** One calibrated process parameter (percent, except ρ and the optical scale, which are plain numbers). */
export interface ProcessParameterEstimate {
  /** the material it belongs to, or null when one control serves every material */
  material: string | null;
  method: "time" | "crystal" | "optical";
  parameter:
    | "toolingPct"
    | "noisePct"
    | "rateErrorPct"
    | "rateDriftPct"
    | "driftCorrelation"
    | "withinLayerPct"
    | "opticalScale";
  value: number;
  low: number;
  high: number;
  /** the program's value now (1 for the optical scale) */
  current: number;
  /** how the interval was made */
  interval: "chi-square" | "chi-square (Satterthwaite)" | "Fisher z" | "bootstrap percentile";
  /** degrees of freedom of a chi-square interval (effective ones for Satterthwaite) */
  dof?: number;
  /** runs that entered the estimate */
  runs: number;
  /** false when the interval excludes the program's value */
  consistent: boolean;
}

/** Realised σ of one optically monitored layer over the runs of one design, against the model's prediction. */
export interface LayerSigmaCheck {
  designKey: string;
  /** deposition index */
  layer: number;
  material: string;
  runs: number;
  realisedPct: number;
  lowPct: number;
  highPct: number;
  /** the program's process model's σ of this layer (processErrorStats) */
  predictedPct: number;
  /** the prediction lies inside the realised interval */
  consistent: boolean;
}

/** Result of {@link calibrateProcessModel}. */
export interface ProcessCalibration {
  runs: number;
  parameters: ProcessParameterEstimate[];
  layers: LayerSigmaCheck[];
  /** the program's error model with its process model's calibrated numbers (null when nothing was identifiable) */
  proposed: ErrorModel | null;
  notes: string[];
}

/** Options of {@link calibrateProcessModel}. */
export interface ProcessCalibrationOptions {
  /** designs by `CalibrationPart.designKey` (needed for optical monitoring: the model's per-layer prediction) */
  designs?: Record<string, Design>;
  /** parametric bootstrap replicates for the time-control intervals (default 200) */
  bootstrap?: number;
  /** trials of processErrorStats for the optical prediction (default 4000) */
  statsTrials?: number;
  /** seed of the bootstrap and the optical prediction (default "calibration") */
  seed?: string;
  /** index drift σ per material (percent) already calibrated, written into the proposal */
  indexDriftPct?: Record<string, number>;
}

interface RunLayer {
  p: number;
  y: number;
  /** variance that is not process: s² (per part, divided by parts) + known absolute terms */
  v: number;
}
interface RunSeries {
  runId: string;
  designKey: string;
  material: string;
  layers: RunLayer[];
}

const round = (x: number): number => Math.round(x * 1000) / 1000;

function chiInterval(ss: number, dof: number, known: number): { value: number; low: number; high: number } {
  const v = ss / dof - known;
  const hi = ss / chiSquareQuantile(dof, -Z_95) - known;
  const lo = ss / chiSquareQuantile(dof, Z_95) - known;
  return {
    value: Math.sqrt(Math.max(0, v)),
    low: Math.sqrt(Math.max(0, lo)),
    high: Math.sqrt(Math.max(0, hi)),
  };
}

function quantile(sorted: readonly number[], q: number): number {
  const i = (sorted.length - 1) * q;
  const a = Math.floor(i);
  const b = Math.min(sorted.length - 1, a + 1);
  return (sorted[a] as number) + (i - a) * ((sorted[b] as number) - (sorted[a] as number));
}

/** Group the parts' layers into one series per (run, design, material), parts of a run averaged per layer. */
function seriesOf(parts: CalibrationPart[], knownNm: (material: string) => number): RunSeries[] {
  const byKey = new Map<
    string,
    {
      runId: string;
      designKey: string;
      material: string;
      at: Map<number, { y: number[]; s2: number[]; d: number }>;
    }
  >();
  parts.forEach((part, i) => {
    part.layers.forEach((l, j) => {
      if (l.index === undefined)
        throw new RangeError(
          `parts[${i}].layers[${j}].index: the process calibration needs each layer's deposition index, got nothing`,
        );
      const designKey = part.designKey ?? "";
      const key = `${part.runId}\u0000${designKey}\u0000${l.material}`;
      let g = byKey.get(key);
      if (!g) {
        g = { runId: part.runId, designKey, material: l.material, at: new Map() };
        byKey.set(key, g);
      }
      let a = g.at.get(l.index);
      if (!a) {
        a = { y: [], s2: [], d: l.nominalNm ?? 0 };
        g.at.set(l.index, a);
      }
      a.y.push(l.errorPct);
      a.s2.push(l.sePct ** 2);
    });
  });
  return [...byKey.values()].map((g) => ({
    runId: g.runId,
    designKey: g.designKey,
    material: g.material,
    layers: [...g.at.entries()]
      .sort((a, b) => a[0] - b[0])
      .map(([p, a]) => {
        const n = a.y.length;
        const abs = knownNm(g.material);
        const rel = abs > 0 && a.d > 0 ? (100 * abs) / a.d : 0;
        return {
          p,
          y: a.y.reduce((s, x) => s + x, 0) / n,
          v: a.s2.reduce((s, x) => s + x, 0) / n / n + rel * rel,
        };
      }),
  }));
}

// ---- quartz crystal ---------------------------------------------------------------------------------------

function crystalEstimates(
  series: RunSeries[],
  material: string | null,
  c: Extract<ResolvedControl, { method: "crystal" }>,
  notes: string[],
): ProcessParameterEstimate[] {
  let ssW = 0;
  let dofW = 0;
  let knownW = 0;
  let nW = 0;
  const byMaterial = new Map<string, RunSeries[]>();
  for (const s of series) byMaterial.set(s.material, [...(byMaterial.get(s.material) ?? []), s]);
  for (const s of series) {
    if (s.layers.length < 2) continue;
    const mean = s.layers.reduce((a, l) => a + l.y, 0) / s.layers.length;
    for (const l of s.layers) {
      ssW += (l.y - mean) ** 2;
      knownW += l.v;
      nW++;
    }
    dofW += s.layers.length - 1;
  }
  const out: ProcessParameterEstimate[] = [];
  const runs = new Set(series.map((s) => s.runId)).size;
  const who = material ?? "all materials";
  let noise2 = (c.noisePct ?? 0) ** 2;
  if (dofW >= 2) {
    const e = chiInterval(ssW, dofW, knownW / nW);
    noise2 = e.value ** 2;
    out.push({
      material,
      method: "crystal",
      parameter: "noisePct",
      ...e,
      current: c.noisePct,
      interval: "chi-square",
      dof: dofW,
      runs,
      consistent: c.noisePct >= e.low && c.noisePct <= e.high,
    });
  } else
    notes.push(
      `${who}: too few determinable layers per run to estimate the crystal noise; the program's ${c.noisePct} % is kept.`,
    );
  // tooling: spread of the run means of each material around that material's mean, pooled over materials
  let ssB = 0;
  let dofB = 0;
  let knownB = 0;
  let nB = 0;
  for (const [m, ss] of byMaterial) {
    if (ss.length < 3) {
      notes.push(`${m}: ${ss.length} run(s); at least 3 are needed for the tooling σ.`);
      continue;
    }
    const means = ss.map((s) => ({
      y: s.layers.reduce((a, l) => a + l.y, 0) / s.layers.length,
      v: (noise2 + s.layers.reduce((a, l) => a + l.v, 0) / s.layers.length) / s.layers.length,
    }));
    const grand = means.reduce((a, x) => a + x.y, 0) / means.length;
    for (const x of means) {
      ssB += (x.y - grand) ** 2;
      knownB += x.v;
      nB++;
    }
    dofB += means.length - 1;
  }
  if (dofB >= 2) {
    const e = chiInterval(ssB, dofB, knownB / nB);
    out.push({
      material,
      method: "crystal",
      parameter: "toolingPct",
      ...e,
      current: c.toolingPct,
      interval: "chi-square",
      dof: dofB,
      runs,
      consistent: c.toolingPct >= e.low && c.toolingPct <= e.high,
    });
  }
  return out;
}

// ---- time / rate control ----------------------------------------------------------------------------------

interface TimeFit {
  u2: number;
  x2: number;
  rho: number;
  w2: number;
  /** ρ was estimated (enough distinct lags) */
  rhoFitted: boolean;
}

/**
 * Weighted least-squares fit of C(h) = a + b ρ^h at a given ρ with a, b ≥ 0 and a + b ≤ total (the lag-0 variance
 * less the measurement part: the within-layer variance cannot be negative); returns [a, b, weighted SSE].
 */
function fitAB(h: number[], c: number[], w: number[], rho: number, total: number): [number, number, number] {
  let sw = 0,
    sx = 0,
    sy = 0,
    sxx = 0,
    sxy = 0;
  for (let i = 0; i < h.length; i++) {
    const x = rho ** (h[i] as number);
    const wi = w[i] as number;
    sw += wi;
    sx += wi * x;
    sy += wi * (c[i] as number);
    sxx += wi * x * x;
    sxy += wi * x * (c[i] as number);
  }
  const det = sw * sxx - sx * sx;
  let a = det > 1e-300 ? (sxx * sy - sx * sxy) / det : sy / sw;
  let b = det > 1e-300 ? (sw * sxy - sx * sy) / det : 0;
  if (a < 0) {
    a = 0;
    b = sxx > 0 ? Math.max(0, sxy / sxx) : 0;
  } else if (b < 0) {
    b = 0;
    a = Math.max(0, sy / sw);
  }
  if (a + b > total) {
    // on the boundary a = total − b: minimise Σ w (c − total + b (1 − ρ^h))²
    const T = Math.max(0, total);
    let num = 0;
    let den = 0;
    for (let i = 0; i < h.length; i++) {
      const g = 1 - rho ** (h[i] as number);
      num -= (w[i] as number) * ((c[i] as number) - T) * g;
      den += (w[i] as number) * g * g;
    }
    b = den > 0 ? Math.min(T, Math.max(0, num / den)) : 0;
    a = T - b;
  }
  let sse = 0;
  for (let i = 0; i < h.length; i++)
    sse += (w[i] as number) * ((c[i] as number) - a - b * rho ** (h[i] as number)) ** 2;
  return [a, b, sse];
}

/** The covariogram estimator of the module comment; `rhoFixed` is used when fewer than 3 lags are available. */
function timeFit(
  series: { material: string; layers: { p: number; y: number; v: number }[] }[],
  rhoFixed: number,
): TimeFit {
  const mean = new Map<string, { s: number; n: number }>();
  for (const s of series)
    for (const l of s.layers) {
      const m = mean.get(s.material) ?? { s: 0, n: 0 };
      m.s += l.y;
      m.n++;
      mean.set(s.material, m);
    }
  const sum = new Map<number, number>();
  const cnt = new Map<number, number>();
  let c0 = 0;
  let n0 = 0;
  for (const s of series) {
    const mm = mean.get(s.material)!;
    const mu = mm.s / mm.n;
    const L = s.layers;
    for (let i = 0; i < L.length; i++) {
      const yi = (L[i] as RunLayer).y - mu;
      c0 += yi * yi - (L[i] as RunLayer).v;
      n0++;
      for (let k = i + 1; k < L.length; k++) {
        const h = (L[k] as RunLayer).p - (L[i] as RunLayer).p;
        sum.set(h, (sum.get(h) ?? 0) + yi * ((L[k] as RunLayer).y - mu));
        cnt.set(h, (cnt.get(h) ?? 0) + 1);
      }
    }
  }
  const lags = [...cnt.keys()].filter((h) => (cnt.get(h) as number) >= 3).sort((a, b) => a - b);
  const h = lags;
  const c = lags.map((x) => (sum.get(x) as number) / (cnt.get(x) as number));
  const w = lags.map((x) => cnt.get(x) as number);
  const C0 = n0 > 0 ? c0 / n0 : 0;
  if (lags.length === 0) return { u2: 0, x2: 0, rho: rhoFixed, w2: Math.max(0, C0), rhoFitted: false };
  let best: { rho: number; a: number; b: number; sse: number } | null = null;
  const fitted = lags.length >= 3;
  const grid = fitted ? Array.from({ length: 200 }, (_, i) => (i + 0.5) / 200) : [rhoFixed];
  for (const rho of grid) {
    const [a, b, sse] = fitAB(h, c, w, rho, C0);
    if (!best || sse < best.sse) best = { rho, a, b, sse };
  }
  if (fitted) {
    // golden-section refinement around the best grid point
    let lo = Math.max(1e-4, best!.rho - 0.005);
    let hi = Math.min(0.9999, best!.rho + 0.005);
    const g = (Math.sqrt(5) - 1) / 2;
    for (let it = 0; it < 30; it++) {
      const r1 = hi - g * (hi - lo);
      const r2 = lo + g * (hi - lo);
      if (fitAB(h, c, w, r1, C0)[2] < fitAB(h, c, w, r2, C0)[2]) hi = r2;
      else lo = r1;
    }
    const rho = (lo + hi) / 2;
    const [a, b, sse] = fitAB(h, c, w, rho, C0);
    if (sse <= best!.sse) best = { rho, a, b, sse };
  }
  const { rho, a, b } = best!;
  return { u2: a, x2: b, rho, w2: Math.max(0, C0 - a - b), rhoFitted: fitted };
}

/** Re-simulate the same runs (positions, known variances) from a time fit, for the parametric bootstrap. */
function simulateTime(
  series: RunSeries[],
  f: TimeFit,
  rng: TrialRandom,
  seed: string,
  index: number,
): { material: string; layers: RunLayer[] }[] {
  rng.reset(seed, index);
  const innov = Math.sqrt(Math.max(0, 1 - f.rho * f.rho));
  const su = Math.sqrt(f.u2);
  const sx = Math.sqrt(f.x2);
  const sw = Math.sqrt(f.w2);
  return series.map((s) => {
    const u = su * rng.normal();
    let x = sx * rng.normal();
    let p = s.layers[0]?.p ?? 0;
    return {
      material: s.material,
      layers: s.layers.map((l) => {
        for (; p < l.p; p++) x = f.rho * x + innov * sx * rng.normal();
        return { p: l.p, v: l.v, y: u + x + sw * rng.normal() + Math.sqrt(l.v) * rng.normal() };
      }),
    };
  });
}

function timeEstimates(
  series: RunSeries[],
  material: string | null,
  c: Extract<ResolvedControl, { method: "time" }>,
  options: { bootstrap: number; seed: string },
  notes: string[],
): { estimates: ProcessParameterEstimate[]; fit: TimeFit | null } {
  const who = material ?? "all materials";
  const runs = new Set(series.map((s) => s.runId)).size;
  if (runs < 3) {
    notes.push(`${who}: ${runs} run(s); at least 3 are needed to calibrate time control.`);
    return { estimates: [], fit: null };
  }
  const f = timeFit(series, c.driftCorrelation);
  if (!f.rhoFitted)
    notes.push(
      `${who}: layers of a material at fewer than 3 different spacings; the drift correlation ρ is held at the program's ${c.driftCorrelation}.`,
    );
  else
    notes.push(
      `${who}: the within-layer σ is told apart from the drift only by the covariance at the shortest spacing; its interval is the least reliable (it held the true value in 30 of 40 simulated calibrations, the others in 35–37 of 40).`,
    );
  const rng = new TrialRandom();
  const boot: TimeFit[] = [];
  for (let b = 0; b < options.bootstrap; b++)
    boot.push(timeFit(simulateTime(series, f, rng, `${options.seed}:time:${who}`, b), c.driftCorrelation));
  const sigma = (
    parameter: "rateErrorPct" | "rateDriftPct" | "withinLayerPct",
    v2: number,
    pick: (t: TimeFit) => number,
    current: number,
  ): ProcessParameterEstimate => {
    const draws = boot.map(pick);
    const mean = draws.reduce((a, x) => a + x, 0) / draws.length;
    const varV = draws.reduce((a, x) => a + (x - mean) ** 2, 0) / Math.max(1, draws.length - 1);
    const dof = varV > 0 ? (2 * v2 * v2) / varV : 0;
    const base = { material, method: "time" as const, parameter, value: Math.sqrt(v2), current, runs };
    let low: number;
    let high: number;
    let interval: ProcessParameterEstimate["interval"];
    if (v2 > 0 && dof >= 2) {
      low = Math.sqrt((dof * v2) / chiSquareQuantile(dof, Z_95));
      high = Math.sqrt((dof * v2) / chiSquareQuantile(dof, -Z_95));
      interval = "chi-square (Satterthwaite)";
    } else {
      const s = draws.map((x) => Math.sqrt(Math.max(0, x))).sort((a, b) => a - b);
      low = Math.min(Math.sqrt(v2), quantile(s, 0.025));
      high = Math.max(Math.sqrt(v2), quantile(s, 0.975));
      interval = "bootstrap percentile";
    }
    return {
      ...base,
      low,
      high,
      interval,
      ...(interval === "bootstrap percentile" ? {} : { dof: round(dof) }),
      consistent: current >= low && current <= high,
    };
  };
  const estimates = [
    sigma("rateErrorPct", f.u2, (t) => t.u2, c.rateErrorPct),
    sigma("rateDriftPct", f.x2, (t) => t.x2, c.rateDriftPct),
    sigma("withinLayerPct", f.w2, (t) => t.w2, c.withinLayerPct),
  ];
  if (f.rhoFitted) {
    const clamp = (r: number) => Math.min(0.9999, Math.max(-0.9999, r));
    const z = boot.map((t) => Math.atanh(clamp(t.rho)));
    const zm = z.reduce((a, x) => a + x, 0) / z.length;
    const se = Math.sqrt(z.reduce((a, x) => a + (x - zm) ** 2, 0) / Math.max(1, z.length - 1));
    const z0 = Math.atanh(clamp(f.rho));
    const low = Math.max(0, Math.tanh(z0 - Z_95 * se));
    const high = Math.tanh(z0 + Z_95 * se);
    estimates.push({
      material,
      method: "time",
      parameter: "driftCorrelation",
      value: f.rho,
      low,
      high,
      current: c.driftCorrelation,
      interval: "Fisher z",
      runs,
      consistent: c.driftCorrelation >= low && c.driftCorrelation <= high,
    });
  }
  return { estimates, fit: f };
}

// ---- optical monitoring -----------------------------------------------------------------------------------

function scaleOptical(c: OpticalControl, s: number): OpticalControl {
  const out: OpticalControl = {
    ...c,
    noisePct: c.noisePct * s,
    driftPct: c.driftPct * s,
    overshootSigmaNm: c.overshootSigmaNm * s,
  };
  if (c.detectionPct !== undefined) out.detectionPct = c.detectionPct * s;
  return out;
}

function withOpticalScale(process: ProcessModel, s: number): ProcessModel {
  const scale = (c: Control): Control => {
    const r = resolveControl(c);
    return r.method === "optical" ? scaleOptical(r, s) : c;
  };
  return {
    ...process,
    control:
      "method" in process.control
        ? scale(process.control as Control)
        : Object.fromEntries(
            Object.entries(process.control as Record<string, Control>).map(([k, c]) => [k, scale(c)]),
          ),
  };
}

// ---- the calibration ---------------------------------------------------------------------------------------

/**
 * Calibrate the process model of `errorModel` (which must carry one) from fitted parts of many runs; see the
 * module comment. Each layer of each part needs its deposition `index` (and `nominalNm` where the program's model
 * has absolute per-layer terms); optical monitoring needs the parts' designs by `designKey`.
 * @throws RangeError for bad input (naming the value).
 */
export function calibrateProcessModel(
  parts: CalibrationPart[],
  errorModelInput: ErrorModel,
  options: ProcessCalibrationOptions = {},
): ProcessCalibration {
  if (!Array.isArray(parts) || parts.length === 0)
    throw new RangeError(`parts: expected at least one fitted part, got ${parts?.length ?? 0}`);
  const errorModel = parseErrorModel(errorModelInput);
  if (!errorModel.process)
    throw new RangeError("errorModel.process: expected a process model to calibrate, got nothing");
  const process = ProcessModelSchema.parse(errorModel.process);
  const bootstrap = options.bootstrap ?? 200;
  if (!Number.isInteger(bootstrap) || bootstrap < 20 || bootstrap > 5000)
    throw new RangeError(`bootstrap: expected an integer in 20..5000, got ${bootstrap}`);
  const seed = options.seed ?? "calibration";
  const single = "method" in process.control;
  const controlOf = (m: string): ResolvedControl | null => {
    if (single) return resolveControl(process.control as Control);
    const c = (process.control as Record<string, Control>)[m];
    return c ? resolveControl(c) : null;
  };
  const knownNm = (m: string): number => {
    const c = controlOf(m);
    return c?.method === "crystal" ? c.terminationNm : c?.method === "time" ? c.shutterNm : 0;
  };
  const notes: string[] = [];
  const all = seriesOf(parts, knownNm);
  const runs = new Set(all.map((s) => s.runId)).size;
  const materials = [...new Set(all.map((s) => s.material))].sort();
  for (const m of materials)
    if (!controlOf(m)) notes.push(`${m}: the process model has no control for it; its layers are left out.`);
  const parameters: ProcessParameterEstimate[] = [];
  // groups: one per material, or one for all materials sharing a single control
  const groups: { material: string | null; control: ResolvedControl; series: RunSeries[] }[] = [];
  if (single)
    groups.push({ material: null, control: resolveControl(process.control as Control), series: all });
  else
    for (const m of materials) {
      const c = controlOf(m);
      if (c) groups.push({ material: m, control: c, series: all.filter((s) => s.material === m) });
    }
  const calibrated = new Map<string | null, Control>();
  const opticalGroups: typeof groups = [];
  for (const g of groups) {
    const c = g.control;
    if (c.method === "crystal") {
      const est = crystalEstimates(g.series, g.material, c, notes);
      parameters.push(...est);
      const get = (p: string, cur: number) => est.find((e) => e.parameter === p)?.value ?? cur;
      calibrated.set(g.material, {
        ...c,
        toolingPct: round(get("toolingPct", c.toolingPct)),
        noisePct: round(get("noisePct", c.noisePct)),
      });
    } else if (c.method === "time") {
      const { estimates, fit } = timeEstimates(g.series, g.material, c, { bootstrap, seed }, notes);
      parameters.push(...estimates);
      calibrated.set(
        g.material,
        fit
          ? {
              ...c,
              rateErrorPct: round(Math.sqrt(fit.u2)),
              rateDriftPct: round(Math.sqrt(fit.x2)),
              driftCorrelation: round(Math.min(0.9999, fit.rho)),
              withinLayerPct: round(Math.sqrt(fit.w2)),
            }
          : c,
      );
    } else opticalGroups.push(g);
  }
  // optical monitoring: per-layer realised σ against the model's prediction, per design
  const layers: LayerSigmaCheck[] = [];
  let opticalScale: ProcessParameterEstimate | null = null;
  if (opticalGroups.length > 0) {
    const opticalMaterials = new Set(
      opticalGroups.flatMap((g) =>
        g.material ? [g.material] : materials.filter((m) => controlOf(m)?.method === "optical"),
      ),
    );
    const designKeys = [...new Set(all.map((s) => s.designKey))].sort();
    const trials = options.statsTrials ?? 4000;
    // realised per (design, layer): one value per run
    const cells: {
      designKey: string;
      layer: number;
      material: string;
      values: number[];
      known: number[];
      runIds: string[];
    }[] = [];
    for (const key of designKeys) {
      const byLayer = new Map<
        number,
        { material: string; values: number[]; known: number[]; runIds: string[] }
      >();
      for (const s of all) {
        if (s.designKey !== key || !opticalMaterials.has(s.material)) continue;
        for (const l of s.layers) {
          const cell = byLayer.get(l.p) ?? { material: s.material, values: [], known: [], runIds: [] };
          cell.values.push(l.y);
          cell.known.push(l.v);
          cell.runIds.push(s.runId);
          byLayer.set(l.p, cell);
        }
      }
      for (const [layer, cell] of [...byLayer.entries()].sort((a, b) => a[0] - b[0]))
        if (cell.values.length >= 3) cells.push({ designKey: key, layer, ...cell });
    }
    const designs = options.designs ?? {};
    const predictFor = (proc: ProcessModel) => {
      const out = new Map<string, number[]>();
      for (const key of new Set(cells.map((c) => c.designKey))) {
        const d = designs[key];
        if (!d) continue;
        out.set(
          key,
          processErrorStats(d, { ...errorModel, process: proc }, trials, `${seed}:optical:${key}`).map(
            (s) => s.sigmaPct,
          ),
        );
      }
      return out;
    };
    const missing = [...new Set(cells.map((c) => c.designKey))].filter((k) => !designs[k]);
    if (missing.length > 0)
      notes.push(
        `No design given for ${missing.length} design(s) of optically monitored parts; their layers are not checked.`,
      );
    const predicted = predictFor(process);
    const checked = cells.filter((c) => predicted.has(c.designKey));
    for (const cell of checked) {
      const R = cell.values.length;
      const mean = cell.values.reduce((a, x) => a + x, 0) / R;
      const ss = cell.values.reduce((a, x) => a + (x - mean) ** 2, 0);
      const e = chiInterval(ss, R - 1, cell.known.reduce((a, x) => a + x, 0) / R);
      const pred = (predicted.get(cell.designKey) as number[])[cell.layer] ?? 0;
      layers.push({
        designKey: cell.designKey,
        layer: cell.layer,
        material: cell.material,
        runs: R,
        realisedPct: e.value,
        lowPct: e.low,
        highPct: e.high,
        predictedPct: pred,
        consistent: pred >= e.low && pred <= e.high,
      });
    }
    if (checked.length === 0)
      notes.push(
        "Optical monitoring: no layer was fitted in 3 or more runs of one design; nothing to compare with the model.",
      );
    else {
      // pooled realised-to-predicted variance ratio; runs resampled for its interval
      const ratioOf = (pick: (cell: (typeof checked)[number]) => number[]) => {
        let num = 0;
        let den = 0;
        checked.forEach((cell) => {
          const idx = pick(cell);
          const v = idx.map((i) => cell.values[i] as number);
          const m = v.reduce((a, x) => a + x, 0) / v.length;
          num +=
            v.reduce((a, x) => a + (x - m) ** 2, 0) -
            ((v.length - 1) * idx.reduce((a, i) => a + (cell.known[i] as number), 0)) / idx.length;
          den += (v.length - 1) * ((predicted.get(cell.designKey) as number[])[cell.layer] ?? 0) ** 2;
        });
        return den > 0 ? Math.max(0, num) / den : 0;
      };
      const ratio = ratioOf((cell) => cell.values.map((_, i) => i));
      const runIds = [...new Set(checked.flatMap((c) => c.runIds))].sort();
      const rng = new TrialRandom();
      const draws: number[] = [];
      for (let b = 0; b < bootstrap; b++) {
        rng.reset(`${seed}:optical-boot`, b);
        const pickRuns = new Map<string, number>();
        for (let k = 0; k < runIds.length; k++) {
          const r = runIds[Math.min(runIds.length - 1, Math.floor(rng.uniform() * runIds.length))] as string;
          pickRuns.set(r, (pickRuns.get(r) ?? 0) + 1);
        }
        draws.push(
          ratioOf((cell) =>
            cell.runIds.flatMap((r, i) => Array.from({ length: pickRuns.get(r) ?? 0 }, () => i)),
          ),
        );
      }
      // chi-square interval of the ratio with Satterthwaite's effective degrees of freedom from the bootstrap
      // variance (a ratio of variances is skewed; the scaled chi-square follows that better than percentiles)
      const dm = draws.reduce((a, x) => a + x, 0) / draws.length;
      const dv = draws.reduce((a, x) => a + (x - dm) ** 2, 0) / Math.max(1, draws.length - 1);
      const nu = dv > 0 ? (2 * ratio * ratio) / dv : 0;
      draws.sort((a, b) => a - b);
      const [rLow, rHigh] =
        ratio > 0 && nu >= 2
          ? [(nu * ratio) / chiSquareQuantile(nu, Z_95), (nu * ratio) / chiSquareQuantile(nu, -Z_95)]
          : [quantile(draws, 0.025), quantile(draws, 0.975)];
      // solve the scale s whose model variance ratio (to the current model) equals a target
      const memo = new Map<number, number>([[1, 1]]);
      const pooledAt = (s: number): number => {
        const hit = memo.get(s);
        if (hit !== undefined) return hit;
        const pred = predictFor(withOpticalScale(process, s));
        let num = 0;
        let den = 0;
        for (const cell of checked) {
          const w = cell.values.length - 1;
          num += w * ((pred.get(cell.designKey) as number[])[cell.layer] ?? 0) ** 2;
          den += w * ((predicted.get(cell.designKey) as number[])[cell.layer] ?? 0) ** 2;
        }
        const r = den > 0 ? num / den : 1;
        memo.set(s, r);
        return r;
      };
      // secant on s from a start (s0, with its known ratio) and the guess s1 (σ ∝ s would make the ratio ∝ s²)
      const solve = (target: number, from = 1): number => {
        if (!(target > 0)) return 0;
        let s0 = from;
        let f0 = pooledAt(s0) - target;
        let s1 = Math.min(50, from * Math.sqrt(target / Math.max(1e-12, pooledAt(from))));
        if (Math.abs(s1 - s0) < 1e-6 * s0) return s0;
        let f1 = pooledAt(s1) - target;
        for (let it = 0; it < 8 && Math.abs(f1) > 1e-3 * target; it++) {
          const s2 = f1 === f0 ? s1 : Math.max(1e-3, s1 - (f1 * (s1 - s0)) / (f1 - f0));
          s0 = s1;
          f0 = f1;
          s1 = Math.min(50, s2);
          f1 = pooledAt(s1) - target;
        }
        return s1;
      };
      const value = solve(ratio);
      const low = solve(rLow, value);
      const high = solve(rHigh, value);
      opticalScale = {
        material: opticalGroups.length === 1 ? opticalGroups[0]!.material : null,
        method: "optical",
        parameter: "opticalScale",
        value,
        low: Math.min(low, value),
        high: Math.max(high, value),
        current: 1,
        interval: ratio > 0 && nu >= 2 ? "chi-square (Satterthwaite)" : "bootstrap percentile",
        ...(ratio > 0 && nu >= 2 ? { dof: round(nu) } : {}),
        runs: runIds.length,
        consistent: Math.min(low, value) <= 1 && Math.max(high, value) >= 1,
      };
      parameters.push(opticalScale);
      const off = layers.filter((l) => !l.consistent).length;
      if (off > 0)
        notes.push(
          `Optical monitoring: ${off} of ${layers.length} layers' realised σ excludes the model's prediction.`,
        );
    }
  }
  // the proposal: the program's process model with the calibrated numbers
  let proposed: ErrorModel | null = null;
  if (parameters.length > 0) {
    const calibrate = (m: string | null, c: Control): Control => {
      const r = resolveControl(c);
      if (r.method === "optical") return opticalScale ? scaleOptical(r, round(opticalScale.value)) : c;
      return calibrated.get(m) ?? c;
    };
    const control = single
      ? calibrate(null, process.control as Control)
      : Object.fromEntries(
          Object.entries(process.control as Record<string, Control>).map(([k, c]) => [k, calibrate(k, c)]),
        );
    proposed = { ...errorModel, process: { ...process, control } };
    if (options.indexDriftPct && Object.keys(options.indexDriftPct).length > 0)
      proposed.indexDriftPct = Object.fromEntries(
        Object.entries(options.indexDriftPct).map(([m, v]) => [m, round(v)]),
      );
  } else notes.push("Nothing of the process model was identifiable from these fits.");
  return { runs, parameters, layers, proposed, notes };
}
