// Live spectrum of the design being edited, computed on the main thread with the optics fast evaluator.
// The evaluator is compiled once per stack structure (materials, media, grid, angle, polarization); a
// thickness edit only re-runs the characteristic-matrix loop.
import { coneQuadrature, createStackEvaluator } from "@stackproof/optics";
import type { Design } from "@stackproof/optics";

export type ChartPolarization = "s" | "p" | "u";

/** Conditions of the chart (nm, degrees in the incident medium). */
export interface SpectrumSettings {
  start: number;
  stop: number;
  points: number;
  angleDeg: number;
  /** Half-angle of the illuminating cone (degrees); 0 = collimated. */
  coneHalfAngleDeg: number;
  polarization: ChartPolarization;
}

/** R, T, A as fractions 0..1 on the wavelength grid (nm). */
export interface Spectrum {
  wavelengths: Float64Array;
  R: Float64Array;
  T: Float64Array;
  A: Float64Array;
}

export function wavelengthGrid(start: number, stop: number, points: number): Float64Array {
  const n = Math.max(2, Math.round(points));
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = start + ((stop - start) * i) / (n - 1);
  return out;
}

/** Everything of a design except its layer thicknesses: what the evaluators are compiled against. */
export function structureKey(design: Design, settings: SpectrumSettings): string {
  return JSON.stringify([
    design.layers.map((l) => l.material),
    design.incident,
    design.exit,
    design.substrate,
    design.materials ?? null,
    settings,
  ]);
}

export interface SpectrumEngine {
  readonly key: string;
  compute(thicknesses: Float64Array): Spectrum;
}

/**
 * Compile the evaluators for a design and chart settings. A collimated beam needs one evaluator; a cone is
 * integrated with the engine's cone quadrature (rays uniform in solid angle), each ray evaluated in s and p
 * and mixed by its s share, so the polarization of the beam is carried correctly onto tilted rays.
 */
export function createSpectrumEngine(design: Design, settings: SpectrumSettings): SpectrumEngine {
  const wavelengths = wavelengthGrid(settings.start, settings.stop, settings.points);
  const n = wavelengths.length;
  const pol = settings.polarization;
  type Part = { ev: ReturnType<typeof createStackEvaluator>; weight: number };
  const parts: Part[] = [];
  if (!(settings.coneHalfAngleDeg > 0)) {
    parts.push({ ev: createStackEvaluator(design, { wavelengths, angleDeg: settings.angleDeg, polarization: pol }), weight: 1 });
  } else {
    const rays = coneQuadrature(settings.angleDeg, settings.coneHalfAngleDeg, 4, settings.angleDeg === 0 ? 1 : 6);
    for (const ray of rays) {
      const sShare = pol === "s" ? ray.sFraction : pol === "p" ? 1 - ray.sFraction : 0.5;
      if (sShare > 0) parts.push({ ev: createStackEvaluator(design, { wavelengths, angleDeg: ray.angleDeg, polarization: "s" }), weight: ray.weight * sShare });
      if (sShare < 1) parts.push({ ev: createStackEvaluator(design, { wavelengths, angleDeg: ray.angleDeg, polarization: "p" }), weight: ray.weight * (1 - sShare) });
    }
  }
  const scratch = { R: new Float64Array(n), T: new Float64Array(n), A: new Float64Array(n) };
  return {
    key: structureKey(design, settings),
    compute(thicknesses) {
      const out: Spectrum = { wavelengths, R: new Float64Array(n), T: new Float64Array(n), A: new Float64Array(n) };
      const only = parts.length === 1 ? parts[0] : undefined;
      if (only) {
        only.ev.evaluate(thicknesses, out);
        return out;
      }
      for (const { ev, weight: w } of parts) {
        ev.evaluate(thicknesses, scratch);
        for (let i = 0; i < n; i++) {
          out.R[i] = (out.R[i] as number) + w * (scratch.R[i] as number);
          out.T[i] = (out.T[i] as number) + w * (scratch.T[i] as number);
          out.A[i] = (out.A[i] as number) + w * (scratch.A[i] as number);
        }
      }
      return out;
    },
  };
}

export function thicknessesOf(design: Design): Float64Array {
  return Float64Array.from(design.layers, (l) => l.thickness);
}

/** Optical density −log10 T, capped at 30 like the engine's spec evaluation. */
export function opticalDensity(T: number): number {
  return -Math.log10(T > 1e-30 ? T : 1e-30);
}

/** Default chart range: the mask's bands with 5 % either side, or λ0 ± 40 %. */
export function defaultRange(bands: readonly { start: number; stop: number }[], referenceNm: number): { start: number; stop: number } {
  if (bands.length === 0) return { start: Math.round(referenceNm * 0.6), stop: Math.round(referenceNm * 1.4) };
  const lo = Math.min(...bands.map((b) => b.start));
  const hi = Math.max(...bands.map((b) => b.stop));
  const pad = Math.max(10, (hi - lo) * 0.05);
  return { start: Math.max(1, Math.floor(lo - pad)), stop: Math.ceil(hi + pad) };
}
