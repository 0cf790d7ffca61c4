import { refractiveIndex, type MaterialModel } from "@stackproof/optics";

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

/** The wavelength span a model is meaningful over: a table's own range, otherwise the given default. */
export function naturalRange(
  model: MaterialModel,
  fallback: [number, number] = [350, 1100],
): [number, number] {
  if (model.kind === "table" && model.points.length > 0) {
    const first = model.points[0]!;
    const last = model.points[model.points.length - 1]!;
    return first[0] === last[0] ? [first[0] - 1, last[0] + 1] : [first[0], last[0]];
  }
  return fallback;
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
      return "Cauchy";
    case "sellmeier":
      return `Sellmeier, ${model.B.length} terms`;
    case "table":
      return `table, ${model.points.length} points`;
  }
}
