import { createStackEvaluator } from "../core/index.ts";
import type { Design } from "../core/index.ts";
import { createSpecEvaluator, parseSpecMask } from "./spec.ts";
import type { Polarization, SpecMaskInput } from "./spec.ts";

/** Central-difference thickness step (nm); layers thinner than this use a forward difference. */
export const SENSITIVITY_STEP_NM = 0.05;
/** Central-difference step of the index factor (relative change of N). */
export const SENSITIVITY_INDEX_STEP = 1e-4;

/** Per-band (and per colour requirement) derivatives of the margin (band units: percent, or OD; colour: the limit's units). */
export interface BandSensitivity {
  id: string;
  margin: number;
  /** ∂margin/∂d_j per nm, per layer (deposition order). */
  thickness: number[];
  /** ∂margin per +1 % of N of every layer of the material, per layer material. */
  index: Record<string, number>;
}

/** Result of {@link specSensitivity}. */
export interface SpecSensitivity {
  bands: BandSensitivity[];
  /**
   * Layers ranked by score = Σ_bands |∂margin/∂d_j| · d_j / 100: the summed margin change for a 1 %
   * thickness error of that layer alone (band units). Highest first.
   */
  criticalLayers: { layer: number; material: string; score: number }[];
  stepNm: number;
  indexStep: number;
}

/**
 * Derivatives of every band margin with respect to each layer thickness (central differences with step
 * {@link SENSITIVITY_STEP_NM} nm) and each material's refractive index (central differences of a common
 * factor on N with relative step {@link SENSITIVITY_INDEX_STEP}, reported per 1 % change). Margins are
 * piecewise smooth (the worst sample can move), so derivatives are local.
 */
export function specSensitivity(
  design: Design,
  maskInput: SpecMaskInput,
  options: { stepNm?: number } = {},
): SpecSensitivity {
  const mask = parseSpecMask(maskInput);
  const h = options.stepNm ?? SENSITIVITY_STEP_NM;
  if (!(h > 0) || !Number.isFinite(h))
    throw new RangeError(`stepNm must be a positive number of nm, got ${h}`);
  const ev = createSpecEvaluator(design, mask);
  const L = ev.layerCount;
  const B = ev.ids.length;
  const nominal = Float64Array.from(ev.nominalThicknesses);
  const base = new Float64Array(B);
  const plus = new Float64Array(B);
  const minus = new Float64Array(B);
  ev.margins(nominal, base);
  const dThick = Array.from({ length: B }, () => new Array<number>(L).fill(0));
  const work = Float64Array.from(nominal);
  for (let j = 0; j < L; j++) {
    const d = nominal[j] as number;
    work[j] = d + h;
    ev.margins(work, plus);
    if (d >= h) {
      work[j] = d - h;
      ev.margins(work, minus);
    } else {
      minus.set(base);
    }
    work[j] = d;
    const span = d >= h ? 2 * h : h;
    for (let b = 0; b < B; b++)
      (dThick[b] as number[])[j] = ((plus[b] as number) - (minus[b] as number)) / span;
  }
  const materials = [...new Set(design.layers.map((l) => l.material))].sort();
  const e = SENSITIVITY_INDEX_STEP;
  const scale = new Float64Array(L);
  const dIndex = Array.from({ length: B }, () => ({}) as Record<string, number>);
  for (const m of materials) {
    design.layers.forEach((l, j) => (scale[j] = l.material === m ? 1 + e : 1));
    ev.margins(nominal, plus, scale);
    design.layers.forEach((l, j) => (scale[j] = l.material === m ? 1 - e : 1));
    ev.margins(nominal, minus, scale);
    for (let b = 0; b < B; b++)
      (dIndex[b] as Record<string, number>)[m] = ((plus[b] as number) - (minus[b] as number)) / (2 * e) / 100;
  }
  const bands = ev.ids.map((id, b) => ({
    id,
    margin: base[b] as number,
    thickness: dThick[b] as number[],
    index: dIndex[b] as Record<string, number>,
  }));
  const criticalLayers = design.layers
    .map((l, j) => ({
      layer: j,
      material: l.material,
      score:
        bands.reduce((s, band) => s + Math.abs(band.thickness[j] as number), 0) *
        ((nominal[j] as number) / 100),
    }))
    .sort((a, b) => b.score - a.score || a.layer - b.layer);
  return { bands, criticalLayers, stepNm: h, indexStep: e };
}

/** Options of {@link sensitivityMap}. */
export interface SensitivityMapOptions {
  wavelengths: number[];
  angleDeg: number;
  polarization: Polarization;
  quantity: "R" | "T";
  stepNm?: number;
}

/** Result of {@link sensitivityMap}: matrix[layer][wavelength] = ∂Q/∂d in percentage points per nm. */
export interface SensitivityMap {
  wavelengths: number[];
  quantity: "R" | "T";
  angleDeg: number;
  polarization: Polarization;
  matrix: number[][];
  stepNm: number;
}

/**
 * Layer × wavelength map of ∂Q/∂d_j (Q = R or T in percent, d in nm) by central differences with step
 * {@link SENSITIVITY_STEP_NM} nm (forward difference for layers thinner than the step).
 */
export function sensitivityMap(design: Design, options: SensitivityMapOptions): SensitivityMap {
  const h = options.stepNm ?? SENSITIVITY_STEP_NM;
  if (!(h > 0) || !Number.isFinite(h))
    throw new RangeError(`stepNm must be a positive number of nm, got ${h}`);
  if (!Array.isArray(options.wavelengths) || options.wavelengths.length === 0) {
    throw new RangeError("wavelengths: expected at least one wavelength in nm, got none");
  }
  if (options.quantity !== "R" && options.quantity !== "T")
    throw new RangeError(`quantity: expected "R" or "T", got ${String(options.quantity)}`);
  const wl = Float64Array.from(options.wavelengths);
  const ev = createStackEvaluator(design, {
    wavelengths: wl,
    angleDeg: options.angleDeg,
    polarization: options.polarization,
  });
  const n = wl.length;
  const mk = () => ({ R: new Float64Array(n), T: new Float64Array(n), A: new Float64Array(n) });
  const p = mk();
  const m = mk();
  const nominal = Float64Array.from(ev.nominalThicknesses);
  const work = Float64Array.from(nominal);
  const matrix: number[][] = [];
  for (let j = 0; j < ev.layerCount; j++) {
    const d = nominal[j] as number;
    work[j] = d + h;
    ev.evaluate(work, p);
    work[j] = d >= h ? d - h : d;
    ev.evaluate(work, m);
    work[j] = d;
    const span = d >= h ? 2 * h : h;
    const qp = options.quantity === "R" ? p.R : p.T;
    const qm = options.quantity === "R" ? m.R : m.T;
    matrix.push(Array.from(qp, (v, i) => ((v - (qm[i] as number)) * 100) / span));
  }
  return {
    wavelengths: options.wavelengths.slice(),
    quantity: options.quantity,
    angleDeg: options.angleDeg,
    polarization: options.polarization,
    matrix,
    stepNm: h,
  };
}
