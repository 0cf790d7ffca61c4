import { refractiveIndex, validRange, type MaterialModel } from "@stackproof/optics";

export interface DispersionPoint {
  wavelength: number;
  n: number;
  k: number;
}

export interface DispersionCurve {
  points: DispersionPoint[];
  /** Wavelengths the model refused (outside a table, at a Sellmeier resonance). */
  refused: number;
  /** The first refusal's message, to show the person. */
  firstError: string | null;
}

/** The wavelength span a model is meaningful over: its stated valid range (a table's own span), otherwise the given default. */
export function naturalRange(
  model: MaterialModel,
  fallback: [number, number] = [350, 1100],
): [number, number] {
  const r = validRange(model);
  if (!r) return fallback;
  return r[0] === r[1] ? [r[0] - 1, r[1] + 1] : r;
}

/** The model's valid range as text, e.g. "210–3710 nm", or a note that none is stated. */
export function rangeLabel(model: MaterialModel): string {
  const r = validRange(model);
  if (!r) return "not stated";
  return r[1] >= 10000 ? `${r[0] / 1000}–${r[1] / 1000} µm` : `${r[0]}–${r[1]} nm`;
}

/** Evaluates N = n − ik of the model at `samples` evenly spaced wavelengths (nm) with the optics package. */
export function sampleDispersion(
  model: MaterialModel,
  startNm: number,
  stopNm: number,
  samples = 241,
): DispersionCurve {
  const points: DispersionPoint[] = [];
  let refused = 0;
  let firstError: string | null = null;
  const count = Math.max(2, samples);
  for (let i = 0; i < count; i++) {
    const wavelength = startNm + ((stopNm - startNm) * i) / (count - 1);
    try {
      const { n, k } = refractiveIndex(model, wavelength);
      points.push({ wavelength, n, k });
    } catch (error) {
      refused++;
      firstError ??= error instanceof Error ? error.message : String(error);
    }
  }
  return { points, refused, firstError };
}

/** A short description of the model kind, for the table. */
export function modelSummary(model: MaterialModel): string {
  switch (model.kind) {
    case "constant":
      return `constant n = ${model.n}${model.k ? `, k = ${model.k}` : ""}`;
    case "cauchy":
      return model.urbach ? "Cauchy with Urbach absorption tail" : "Cauchy";
    case "sellmeier":
      return `Sellmeier, ${model.B.length} terms`;
    case "table":
      return `table, ${model.points.length} points`;
    case "tauc-lorentz":
      return `Tauc–Lorentz, Eg = ${model.Eg} eV`;
    case "drude-lorentz":
      return `Drude–Lorentz, ${model.oscillators.length} oscillator${model.oscillators.length === 1 ? "" : "s"}`;
  }
}
