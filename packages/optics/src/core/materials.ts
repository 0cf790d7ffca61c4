/**
 * Optical constants and dispersion models.
 *
 * Conventions used throughout the engine: wavelength λ in nanometres at the API, complex
 * refractive index N = n − ik with k ≥ 0 for an absorbing medium (the thin-film handbook
 * sign, Macleod, *Thin-Film Optical Filters*). Cauchy and Sellmeier formulas take λ in
 * micrometres internally, as they are written in the literature.
 */
import { z } from "zod";

const finite = z.number().refine(Number.isFinite, { error: "expected a finite number" });
const nonNegative = z.number().min(0, { error: "expected a number ≥ 0" });

/** Constant index: N = n − ik at every wavelength. */
export const ConstantModelSchema = z.object({
  kind: z.literal("constant"),
  n: z.number().positive({ error: "expected a number > 0" }),
  k: nonNegative.default(0),
});

/** Cauchy: n(λ) = A + B/λ² + C/λ⁴ with λ in µm (B in µm², C in µm⁴); constant k. */
export const CauchyModelSchema = z.object({
  kind: z.literal("cauchy"),
  A: finite,
  B: finite.default(0),
  C: finite.default(0),
  k: nonNegative.optional(),
});

/**
 * Sellmeier: n²(λ) = 1 + Σ Bᵢ λ² / (λ² − Cᵢ) with λ in µm and Cᵢ in µm² (Malitson's form);
 * constant k.
 */
export const SellmeierModelSchema = z
  .object({
    kind: z.literal("sellmeier"),
    B: z.array(finite).min(1, { error: "expected at least one term" }),
    C: z.array(nonNegative).min(1, { error: "expected at least one term" }),
    k: nonNegative.optional(),
  })
  .refine((m) => m.B.length === m.C.length, {
    error: "expected B and C of equal length",
    path: ["C"],
  });

/** One row of a tabulated model: [wavelength nm, n, k]. */
export const TablePointSchema = z.tuple([z.number().positive(), z.number().positive(), nonNegative]);

/**
 * Tabulated n, k against wavelength (nm), interpolated linearly in λ. Points must be sorted
 * by strictly increasing wavelength. Outside the table the model refuses (RangeError) unless
 * `extrapolate` is true, in which case the end value is held (clamped) and the caller is told.
 */
export const TableModelSchema = z
  .object({
    kind: z.literal("table"),
    points: z.array(TablePointSchema).min(1, { error: "expected at least one point" }),
    extrapolate: z.boolean().optional(),
  })
  .refine(
    (m) => m.points.every((p, i) => i === 0 || p[0] > (m.points[i - 1] as [number, number, number])[0]),
    { error: "expected points sorted by strictly increasing wavelength", path: ["points"] },
  );

/** Dispersion model, discriminated on `kind`. */
export const MaterialModelSchema = z.discriminatedUnion("kind", [
  ConstantModelSchema,
  CauchyModelSchema,
  SellmeierModelSchema,
  TableModelSchema,
]);

/** A dispersion model (output type of {@link MaterialModelSchema}). */
export type MaterialModel = z.output<typeof MaterialModelSchema>;
/** A dispersion model as written in JSON (defaults not yet applied). */
export type MaterialModelInput = z.input<typeof MaterialModelSchema>;

/** What a material is normally used for; informative only, the engine accepts any role anywhere. */
export const MaterialRoleSchema = z.enum(["layer", "substrate", "medium", "metal"]);
/** Informative material role. */
export type MaterialRole = z.output<typeof MaterialRoleSchema>;

/**
 * A named material: `id` is what designs refer to, `source` names the published reference
 * of its optical constants (or says "approximate, from memory").
 */
export const MaterialSchema = z.object({
  id: z.string().min(1, { error: "expected a non-empty id" }),
  name: z.string().min(1, { error: "expected a non-empty name" }),
  model: MaterialModelSchema,
  role: MaterialRoleSchema,
  source: z.string(),
});

/** A material (output type of {@link MaterialSchema}). */
export type Material = z.output<typeof MaterialSchema>;
/** A material as written in JSON (model defaults not yet applied). */
export type MaterialInput = z.input<typeof MaterialSchema>;

/** Complex index N = n − ik at one wavelength; `extrapolated` is set when a table was clamped. */
export interface IndexValue {
  n: number;
  k: number;
  extrapolated?: true;
}

/** Tabulated index over a wavelength grid; `extrapolated` counts wavelengths that were clamped. */
export interface IndexTable {
  n: Float64Array;
  k: Float64Array;
  extrapolated: number;
}

function assertWavelength(wavelengthNm: number): void {
  if (!(wavelengthNm > 0) || !Number.isFinite(wavelengthNm)) {
    throw new RangeError(`wavelength: expected a finite number > 0 nm, got ${String(wavelengthNm)}`);
  }
}

/**
 * Evaluate a dispersion model at one wavelength.
 *
 * @param model  dispersion model (constant, Cauchy, Sellmeier or table)
 * @param wavelengthNm  vacuum wavelength in nm
 * @returns N = n − ik as `{n, k}` (k ≥ 0 absorbing)
 * @throws RangeError for a non-positive wavelength, a table queried outside its range without
 *   `extrapolate`, or a Sellmeier model evaluated at or below a resonance (n² ≤ 0).
 */
export function refractiveIndex(model: MaterialModel, wavelengthNm: number): IndexValue {
  assertWavelength(wavelengthNm);
  switch (model.kind) {
    case "constant":
      return { n: model.n, k: model.k };
    case "cauchy": {
      const l2 = (wavelengthNm * 1e-3) ** 2;
      return { n: model.A + model.B / l2 + model.C / (l2 * l2), k: model.k ?? 0 };
    }
    case "sellmeier": {
      const l2 = (wavelengthNm * 1e-3) ** 2;
      let n2 = 1;
      for (let i = 0; i < model.B.length; i++) {
        n2 += ((model.B[i] ?? 0) * l2) / (l2 - (model.C[i] ?? 0));
      }
      if (!(n2 > 0) || !Number.isFinite(n2)) {
        throw new RangeError(
          `Sellmeier model gives n² = ${n2.toPrecision(4)} ≤ 0 at ${wavelengthNm} nm (inside a resonance)`,
        );
      }
      return { n: Math.sqrt(n2), k: model.k ?? 0 };
    }
    case "table":
      return tableIndex(model.points, wavelengthNm, model.extrapolate === true);
  }
}

function tableIndex(
  points: readonly (readonly [number, number, number])[],
  wavelengthNm: number,
  extrapolate: boolean,
): IndexValue {
  const first = points[0] as readonly [number, number, number];
  const last = points[points.length - 1] as readonly [number, number, number];
  if (wavelengthNm < first[0] || wavelengthNm > last[0]) {
    if (!extrapolate) {
      throw new RangeError(
        `wavelength ${wavelengthNm} nm is outside the table range ${first[0]}–${last[0]} nm ` +
          `(set extrapolate: true to hold the end values)`,
      );
    }
    const end = wavelengthNm < first[0] ? first : last;
    return { n: end[1], k: end[2], extrapolated: true };
  }
  // binary search for the bracketing interval
  let lo = 0;
  let hi = points.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if ((points[mid] as readonly [number, number, number])[0] <= wavelengthNm) lo = mid;
    else hi = mid;
  }
  const a = points[lo] as readonly [number, number, number];
  const b = points[hi] as readonly [number, number, number];
  if (b[0] === a[0]) return { n: a[1], k: a[2] };
  const t = (wavelengthNm - a[0]) / (b[0] - a[0]);
  return { n: a[1] + t * (b[1] - a[1]), k: a[2] + t * (b[2] - a[2]) };
}

/**
 * Evaluate a dispersion model over a wavelength grid (nm) into typed arrays.
 *
 * @param out optional preallocated `{n, k}` arrays of the grid's length (reused, not allocated)
 * @returns N = n − ik per wavelength and the number of clamped (extrapolated) table points
 * @throws RangeError as {@link refractiveIndex}
 */
export function indexTable(
  model: MaterialModel,
  wavelengths: ArrayLike<number>,
  out?: { n: Float64Array; k: Float64Array },
): IndexTable {
  const len = wavelengths.length;
  const n = out?.n ?? new Float64Array(len);
  const k = out?.k ?? new Float64Array(len);
  if (n.length < len || k.length < len) {
    throw new RangeError(`indexTable: output arrays shorter than the ${len} wavelengths`);
  }
  let extrapolated = 0;
  for (let i = 0; i < len; i++) {
    const v = refractiveIndex(model, wavelengths[i] as number);
    n[i] = v.n;
    k[i] = v.k;
    if (v.extrapolated) extrapolated++;
  }
  return { n, k, extrapolated };
}
