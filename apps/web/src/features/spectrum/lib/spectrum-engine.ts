// Live spectrum of the design being edited, computed on the main thread by the optics package's chart engine
// (createLiveSpectrum: tabulated once per stack structure, a thickness edit only re-runs the matrix loop; a cone
// uses the same adaptive rule as the spec verdicts). No physics here: grids, cones and OD come from optics.
import { createLiveSpectrum, evenGrid, quantityValue } from "@stackproof/optics";
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

/** Compile the optics chart engine for a design and chart settings. */
export function createSpectrumEngine(design: Design, settings: SpectrumSettings): SpectrumEngine {
  const wavelengths = evenGrid(settings.start, settings.stop, Math.max(2, settings.points));
  const live = createLiveSpectrum(design, {
    wavelengths,
    angleDeg: settings.angleDeg,
    polarization: settings.polarization,
    ...(settings.coneHalfAngleDeg > 0 ? { cone: { halfAngleDeg: settings.coneHalfAngleDeg } } : {}),
  });
  return {
    key: structureKey(design, settings),
    compute(thicknesses) {
      return { wavelengths: live.wavelengths, ...live.compute(thicknesses) };
    },
  };
}

export function thicknessesOf(design: Design): Float64Array {
  return Float64Array.from(design.layers, (l) => l.thickness);
}

/** Optical density −log10 T as the optics package defines it for spec bands (same floor). */
export function opticalDensity(T: number): number {
  return quantityValue("OD", 0, T, 0);
}

/** Default chart range: the mask's bands with 5 % either side, or λ0 ± 40 %. */
export function defaultRange(bands: readonly { start: number; stop: number }[], referenceNm: number): { start: number; stop: number } {
  if (bands.length === 0) return { start: Math.round(referenceNm * 0.6), stop: Math.round(referenceNm * 1.4) };
  const lo = Math.min(...bands.map((b) => b.start));
  const hi = Math.max(...bands.map((b) => b.stop));
  const pad = Math.max(10, (hi - lo) * 0.05);
  return { start: Math.max(1, Math.floor(lo - pad)), stop: Math.ceil(hi + pad) };
}
