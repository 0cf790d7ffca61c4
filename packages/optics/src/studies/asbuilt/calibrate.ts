/**
 * Calibration of the process error model from fitted parts of many runs.
 *
 * Model (the same as the Monte Carlo's, see error-model.ts): in run r, layer j of material m is built with
 * relative error e = t_rm + ε, t_rm ~ N(0, σ_sys,m) shared by every layer of m in the run (tooling),
 * ε ~ N(0, σ_rand) per layer; index scale per run and material ~ N(0, σ_drift,m). Each fitted error comes
 * with its standard error s, which is removed from the spread (method of moments).
 *
 * - σ_rand: pooled within-run, within-material spread of the determinable layer errors around their run
 *   mean, ν = Σ (n_rm − 1) degrees of freedom; σ² = SS/ν − mean(s²).
 * - σ_sys,m: spread of the run means t̂_rm around their grand mean, ν = R − 1; σ² = SS/ν − mean(σ_rand²/n_rm + s̄²/n_rm).
 * - σ_drift,m: spread of the fitted index scales, ν = R − 1, minus their mean s².
 * 95 % intervals from the chi-square distribution of SS/σ² with ν degrees of freedom (e.g. NIST/SEMATECH
 * e-Handbook of Statistical Methods, 1.3.5.8, chi-square test for the standard deviation), quantiles by the
 * Wilson–Hilferty cube-root approximation (Wilson & Hilferty, PNAS 17:684, 1931; hand-written: one line,
 * accurate to better than 1 % in the quantile for ν ≥ 5). The measurement part is subtracted from both limits.
 */
import type { ErrorModel } from "../error-model.ts";
import { Z_95 } from "../wilson.ts";
import type { ProcessCalibration } from "./calibrate-process.ts";

/** One fitted part, reduced to what calibration needs. */
export interface CalibrationPart {
  runId: string;
  /** ISO date of the run (for the time series), optional */
  date?: string;
  /** which design the part was built to (e.g. a revision id); the process calibration compares layers of one design */
  designKey?: string;
  /**
   * determinable layers only; errors and standard errors in percent; `index` is the layer's deposition index in its
   * design and `nominalNm` its nominal thickness (both needed by the process calibration, not by the error model's)
   */
  layers: { material: string; errorPct: number; sePct: number; index?: number; nominalNm?: number }[];
  /** fitted index scale per material, percent (scale − 1), with its standard error */
  index?: Record<string, { valuePct: number; sePct: number }>;
}

/** An estimated σ (percent) with its 95 % interval and degrees of freedom. */
export interface SigmaEstimate {
  sigmaPct: number;
  lowPct: number;
  highPct: number;
  dof: number;
  /** mean of the quantity (a bias, percent): tooling that is off on average is a correction, not a spread */
  meanPct: number;
}

/** Result of {@link calibrateErrorModel}. */
export interface Calibration {
  runs: number;
  parts: number;
  random: SigmaEstimate | null;
  systematic: Record<string, SigmaEstimate>;
  indexDrift: Record<string, SigmaEstimate>;
  /** the calibrated model, in the error-model format the Monte Carlo reads */
  proposed: ErrorModel;
  notes: string[];
  /** the program's process model calibrated (calibrateProcessModel), when the program's error model has one */
  process?: ProcessCalibration | null;
}

/** Chi-square quantile by Wilson–Hilferty: ν (1 − 2/(9ν) + z √(2/(9ν)))³. */
export function chiSquareQuantile(dof: number, z: number): number {
  if (!(dof > 0)) throw new RangeError(`dof: expected > 0, got ${dof}`);
  const a = 2 / (9 * dof);
  return dof * Math.max(0, 1 - a + z * Math.sqrt(a)) ** 3;
}

function interval(ss: number, dof: number, measurementVar: number, mean: number): SigmaEstimate {
  const v = ss / dof - measurementVar;
  const hi = ss / chiSquareQuantile(dof, -Z_95) - measurementVar;
  const lo = ss / chiSquareQuantile(dof, Z_95) - measurementVar;
  return {
    sigmaPct: Math.sqrt(Math.max(0, v)),
    lowPct: Math.sqrt(Math.max(0, lo)),
    highPct: Math.sqrt(Math.max(0, hi)),
    dof,
    meanPct: mean,
  };
}

/**
 * Estimate the process error model from fitted parts (see the module comment). Parts of one run are pooled
 * for the tooling mean of the run. Throws RangeError for bad input; fewer than 3 runs give no systematic or
 * drift estimate (noted).
 */
export function calibrateErrorModel(parts: CalibrationPart[]): Calibration {
  if (!Array.isArray(parts) || parts.length === 0)
    throw new RangeError(`parts: expected at least one fitted part, got ${parts?.length ?? 0}`);
  parts.forEach((p, i) => {
    if (typeof p.runId !== "string" || p.runId === "")
      throw new RangeError(`parts[${i}].runId: expected a non-empty string, got ${String(p.runId)}`);
    p.layers.forEach((l, j) => {
      if (!Number.isFinite(l.errorPct) || !(l.sePct >= 0))
        throw new RangeError(
          `parts[${i}].layers[${j}]: expected a finite errorPct and sePct ≥ 0, got ${l.errorPct}, ${l.sePct}`,
        );
    });
  });
  const notes: string[] = [];
  const runs = new Map<string, CalibrationPart[]>();
  for (const p of parts) runs.set(p.runId, [...(runs.get(p.runId) ?? []), p]);
  const materials = [...new Set(parts.flatMap((p) => p.layers.map((l) => l.material)))].sort();
  // within-run, within-material spread
  let ssW = 0;
  let dofW = 0;
  let se2 = 0;
  let nSe = 0;
  const runMeans = new Map<string, { mean: number; n: number; se2: number }[]>();
  for (const m of materials) runMeans.set(m, []);
  for (const [, ps] of runs) {
    for (const m of materials) {
      const ls = ps.flatMap((p) => p.layers.filter((l) => l.material === m));
      if (ls.length === 0) continue;
      const mean = ls.reduce((s, l) => s + l.errorPct, 0) / ls.length;
      for (const l of ls) {
        ssW += (l.errorPct - mean) ** 2;
        se2 += l.sePct ** 2;
        nSe++;
      }
      dofW += ls.length - 1;
      runMeans
        .get(m)!
        .push({ mean, n: ls.length, se2: ls.reduce((s, l) => s + l.sePct ** 2, 0) / ls.length });
    }
  }
  const meanSe2 = nSe > 0 ? se2 / nSe : 0;
  const random = dofW > 0 ? interval(ssW, dofW, meanSe2, 0) : null;
  if (!random)
    notes.push("Too few determinable layers per run and material to estimate the random per-layer σ.");
  const rand2 = random ? random.sigmaPct ** 2 : 0;
  const systematic: Record<string, SigmaEstimate> = {};
  for (const m of materials) {
    const ms = runMeans.get(m)!;
    if (ms.length < 3) {
      notes.push(`${m}: ${ms.length} run(s); at least 3 are needed for the tooling σ.`);
      continue;
    }
    const grand = ms.reduce((s, r) => s + r.mean, 0) / ms.length;
    const ss = ms.reduce((s, r) => s + (r.mean - grand) ** 2, 0);
    const measVar = ms.reduce((s, r) => s + (rand2 + r.se2) / r.n, 0) / ms.length;
    systematic[m] = interval(ss, ms.length - 1, measVar, grand);
    if (Math.abs(grand) > 2 * Math.sqrt(ss / (ms.length - 1) / ms.length))
      notes.push(
        `${m}: the tooling is off by ${grand.toFixed(2)} % on average — correct the tooling factor; the σ is the spread around that mean.`,
      );
  }
  const indexDrift: Record<string, SigmaEstimate> = {};
  for (const m of materials) {
    const vals: { v: number; se: number }[] = [];
    for (const [, ps] of runs) {
      const xs = ps
        .map((p) => p.index?.[m])
        .filter((x): x is { valuePct: number; sePct: number } => x !== undefined);
      if (xs.length > 0)
        vals.push({
          v: xs.reduce((s, x) => s + x.valuePct, 0) / xs.length,
          se: Math.sqrt(xs.reduce((s, x) => s + x.sePct ** 2, 0) / xs.length / xs.length),
        });
    }
    if (vals.length < 3) continue;
    const mean = vals.reduce((s, x) => s + x.v, 0) / vals.length;
    const ss = vals.reduce((s, x) => s + (x.v - mean) ** 2, 0);
    indexDrift[m] = interval(
      ss,
      vals.length - 1,
      vals.reduce((s, x) => s + x.se ** 2, 0) / vals.length,
      mean,
    );
  }
  const proposed: ErrorModel = {
    thickness: { relativePct: random ? round(random.sigmaPct) : 0, absoluteNm: 0, distribution: "normal" },
  };
  if (Object.keys(systematic).length > 0)
    proposed.systematicPct = Object.fromEntries(
      Object.entries(systematic).map(([m, s]) => [m, round(s.sigmaPct)]),
    );
  if (Object.keys(indexDrift).length > 0)
    proposed.indexDriftPct = Object.fromEntries(
      Object.entries(indexDrift).map(([m, s]) => [m, round(s.sigmaPct)]),
    );
  return { runs: runs.size, parts: parts.length, random, systematic, indexDrift, proposed, notes };
}

const round = (x: number): number => Math.round(x * 1000) / 1000;
