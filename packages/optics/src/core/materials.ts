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
const positiveEv = z
  .number()
  .positive({ error: "expected a number > 0 (eV)" })
  .max(1e3, { error: "expected a number ≤ 1000 eV" });

/** hc in eV·nm: photon energy E (eV) = HC_EV_NM / λ (nm) (CODATA 2018, h c / e). */
export const HC_EV_NM = 1239.841984;

/**
 * Largest n or k any model may give (and a constant model may declare). Measured metals in the far
 * infrared reach a few hundred (aluminium k ≈ 100 at 10 µm; Rakić, Appl. Opt. 34, 4755 (1995), from
 * memory); 1e3 leaves room for them while n² and k² stay far from overflow in the kernel.
 */
export const MAX_INDEX = 1e3;

/**
 * The wavelength range (nm, [min, max]) over which a model is trusted: its source's range for
 * library entries. Outside it the model still evaluates, and results carry a warning.
 */
export const ValidRangeSchema = z
  .tuple([
    z.number().positive({ error: "expected a number > 0 nm" }),
    z.number().positive({ error: "expected a number > 0 nm" }),
  ])
  .refine((r) => r[0] < r[1], { error: "expected [min, max] with min < max (nm)" });
/** A valid wavelength range [min, max] in nm. */
export type ValidRange = [number, number];

const range = ValidRangeSchema.optional();

/** Constant index: N = n − ik at every wavelength. */
export const ConstantModelSchema = z.object({
  kind: z.literal("constant"),
  n: z
    .number()
    .positive({ error: "expected a number > 0" })
    .max(MAX_INDEX, { error: `expected a number ≤ ${MAX_INDEX}` }),
  k: nonNegative.max(MAX_INDEX, { error: `expected a number ≤ ${MAX_INDEX}` }).default(0),
  range,
});

/**
 * Urbach absorption tail below a band gap: k(E) = k0 · exp((E − E0)/Eu) for E < E0 (photon energy
 * E in eV), held at k0 for E ≥ E0 (above the gap the tail formula no longer applies; give the model
 * a valid range that stops at the gap). Urbach, Phys. Rev. 92, 1324 (1953).
 */
export const UrbachTailSchema = z.object({
  k0: nonNegative.max(MAX_INDEX, { error: `expected a number ≤ ${MAX_INDEX}` }),
  E0: positiveEv,
  Eu: positiveEv,
});
/** Urbach tail parameters (k0 dimensionless, E0 and Eu in eV). */
export type UrbachTail = z.output<typeof UrbachTailSchema>;

/**
 * Cauchy: n(λ) = A + B/λ² + C/λ⁴ with λ in µm (B in µm², C in µm⁴); constant k, plus an optional
 * Urbach tail added to k.
 */
export const CauchyModelSchema = z.object({
  kind: z.literal("cauchy"),
  A: finite,
  B: finite.default(0),
  C: finite.default(0),
  k: nonNegative.optional(),
  urbach: UrbachTailSchema.optional(),
  range,
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
    range,
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
    range,
  })
  .refine(
    (m) => m.points.every((p, i) => i === 0 || p[0] > (m.points[i - 1] as [number, number, number])[0]),
    { error: "expected points sorted by strictly increasing wavelength", path: ["points"] },
  );

/**
 * Tauc–Lorentz dielectric function of an amorphous absorbing film (Jellison & Modine, Appl. Phys.
 * Lett. 69, 371 (1996); erratum 69, 2137): ε2(E) = A E0 C (E − Eg)² / [((E² − E0²)² + C² E²) E]
 * for E > Eg, 0 below; ε1 from the paper's closed-form Kramers–Kronig integral plus ε1(∞).
 * Energies in eV (A in eV); requires C < 2 E0 (α = √(4E0² − C²) real) and Eg < E0.
 */
export const TaucLorentzModelSchema = z
  .object({
    kind: z.literal("tauc-lorentz"),
    A: positiveEv,
    E0: positiveEv,
    C: positiveEv,
    Eg: positiveEv,
    epsInf: finite.default(1),
    range,
  })
  .refine((m) => m.C < 2 * m.E0, { error: "expected C < 2·E0 (eV)", path: ["C"] })
  .refine((m) => m.Eg < m.E0, { error: "expected Eg < E0 (eV)", path: ["Eg"] });

/** One Lorentz oscillator of a Drude–Lorentz model: strength f, resonance E (eV), damping gamma (eV). */
export const LorentzOscillatorSchema = z.object({
  f: nonNegative,
  E: positiveEv,
  gamma: nonNegative.max(1e3),
});

/**
 * Drude–Lorentz dielectric function for metals and conducting oxides, in the form of Rakić et al.,
 * Appl. Opt. 37, 5271 (1998), with photon energy E in eV:
 * ε(E) = εInf − f0 Ep² / (E (E + iΓ0)) + Σⱼ fⱼ Ep² / (Eⱼ² − E² − iEΓⱼ)
 * (written for exp(−iωt), Im ε ≥ 0; the engine returns N = n − ik with k ≥ 0 from it).
 */
export const DrudeLorentzModelSchema = z.object({
  kind: z.literal("drude-lorentz"),
  epsInf: finite.default(1),
  /** plasma energy Ep, eV */
  Ep: positiveEv,
  /** Drude (free-carrier) strength f0 and damping Γ0 (eV) */
  f0: nonNegative.default(1),
  gamma0: nonNegative.max(1e3),
  oscillators: z.array(LorentzOscillatorSchema).default([]),
  range,
});

/** Dispersion model, discriminated on `kind`. */
export const MaterialModelSchema = z.discriminatedUnion("kind", [
  ConstantModelSchema,
  CauchyModelSchema,
  SellmeierModelSchema,
  TableModelSchema,
  TaucLorentzModelSchema,
  DrudeLorentzModelSchema,
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

/**
 * Complex index N = n − ik at one wavelength; `extrapolated` is set when a table was clamped,
 * `outOfRange` when the wavelength lies outside the model's stated valid range.
 */
export interface IndexValue {
  n: number;
  k: number;
  extrapolated?: true;
  outOfRange?: true;
}

/**
 * Tabulated index over a wavelength grid; `extrapolated` counts wavelengths that were clamped,
 * `outOfRange` those outside the model's valid range.
 */
export interface IndexTable {
  n: Float64Array;
  k: Float64Array;
  extrapolated: number;
  outOfRange: number;
}

/**
 * The wavelength range (nm) a model is valid over: its declared `range`, else a table's span, else
 * `null` (unbounded, nothing declared).
 */
export function validRange(model: MaterialModel): ValidRange | null {
  if (model.range) return [model.range[0], model.range[1]];
  if (model.kind === "table") {
    const first = model.points[0];
    const last = model.points[model.points.length - 1];
    if (first && last) return [first[0], last[0]];
  }
  return null;
}

/**
 * Tauc–Lorentz ε1, ε2 at photon energy E (eV) (Jellison & Modine 1996, with the erratum).
 * Exported for tests.
 */
export function taucLorentzEpsilon(
  m: { A: number; E0: number; C: number; Eg: number; epsInf: number },
  E: number,
): { eps1: number; eps2: number } {
  const { A, E0, C, Eg, epsInf } = m;
  const E2 = E * E;
  const E02 = E0 * E0;
  const Eg2 = Eg * Eg;
  const C2 = C * C;
  const eps2 = E > Eg ? (A * E0 * C * (E - Eg) ** 2) / (((E2 - E02) ** 2 + C2 * E2) * E) : 0;
  const alpha = Math.sqrt(4 * E02 - C2);
  const gamma2 = E02 - C2 / 2;
  const zeta4 = (E2 - gamma2) ** 2 + (alpha * alpha * C2) / 4;
  const aLn = (Eg2 - E02) * E2 + Eg2 * C2 - E02 * (E02 + 3 * Eg2);
  const aAtan = (E2 - E02) * (E02 + Eg2) + Eg2 * C2;
  const pz = Math.PI * zeta4;
  let eps1 = epsInf;
  eps1 +=
    ((A * C * aLn) / (2 * pz * alpha * E0)) * Math.log((E02 + Eg2 + alpha * Eg) / (E02 + Eg2 - alpha * Eg));
  eps1 -=
    ((A * aAtan) / (pz * E0)) * (Math.PI - Math.atan((2 * Eg + alpha) / C) + Math.atan((alpha - 2 * Eg) / C));
  eps1 +=
    ((4 * A * E0 * Eg * (E2 - gamma2)) / (pz * alpha)) *
    (Math.atan((alpha + 2 * Eg) / C) + Math.atan((alpha - 2 * Eg) / C));
  const dE = Math.abs(E - Eg);
  const c1 = (A * E0 * C * (E2 + Eg2)) / (pz * E);
  const c2 = (2 * A * E0 * C * Eg) / pz;
  const root = Math.sqrt((E02 - Eg2) ** 2 + Eg2 * C2);
  if (dE > 0) {
    eps1 += -c1 * Math.log(dE / (E + Eg)) + c2 * Math.log((dE * (E + Eg)) / root);
  } else {
    // at E = Eg, c1 = c2 and the two ln|E − Eg| parts cancel; what remains is finite
    eps1 += c1 * Math.log(E + Eg) + c2 * Math.log((E + Eg) / root);
  }
  return { eps1, eps2 };
}

/**
 * N = n − ik from ε = ε1 − iε2 (ε2 ≥ 0 absorbing): n = √((|ε| + ε1)/2), k = √((|ε| − ε1)/2).
 * Written with the cancellation-free branch for the smaller root.
 */
function indexFromEpsilon(eps1: number, eps2: number): { n: number; k: number } {
  const mod = Math.hypot(eps1, eps2);
  if (eps1 >= 0) {
    const n = Math.sqrt((mod + eps1) / 2);
    return { n, k: n > 0 ? Math.abs(eps2) / (2 * n) : 0 };
  }
  const k = Math.sqrt((mod - eps1) / 2);
  return { n: k > 0 ? Math.abs(eps2) / (2 * k) : 0, k };
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
  const v = evaluateModel(model, wavelengthNm);
  const r = model.range;
  if (r && (wavelengthNm < r[0] || wavelengthNm > r[1])) v.outOfRange = true;
  return v;
}

function evaluateModel(model: MaterialModel, wavelengthNm: number): IndexValue {
  switch (model.kind) {
    case "constant":
      return { n: model.n, k: model.k };
    case "cauchy": {
      const l2 = (wavelengthNm * 1e-3) ** 2;
      let k = model.k ?? 0;
      const u = model.urbach;
      if (u) {
        const E = HC_EV_NM / wavelengthNm;
        k += E < u.E0 ? u.k0 * Math.exp((E - u.E0) / u.Eu) : u.k0;
      }
      return { n: model.A + model.B / l2 + model.C / (l2 * l2), k };
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
    case "tauc-lorentz": {
      const { eps1, eps2 } = taucLorentzEpsilon(model, HC_EV_NM / wavelengthNm);
      return indexFromEpsilon(eps1, eps2);
    }
    case "drude-lorentz": {
      const E = HC_EV_NM / wavelengthNm;
      const Ep2 = model.Ep * model.Ep;
      // Drude term −f0 Ep² / (E² + iEΓ0) = −f0 Ep² (E² − iEΓ0) / (E⁴ + E²Γ0²)
      const g0 = model.gamma0;
      const dd = E * E * (E * E + g0 * g0);
      let re = model.epsInf - (model.f0 * Ep2 * E * E) / dd;
      let im = (model.f0 * Ep2 * E * g0) / dd;
      for (const o of model.oscillators) {
        // f Ep² / (Eo² − E² − iEγ) = f Ep² (Eo² − E² + iEγ) / ((Eo² − E²)² + E²γ²)
        const a = o.E * o.E - E * E;
        const b = E * o.gamma;
        const d = a * a + b * b;
        re += (o.f * Ep2 * a) / d;
        im += (o.f * Ep2 * b) / d;
      }
      return indexFromEpsilon(re, im);
    }
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
  let outOfRange = 0;
  for (let i = 0; i < len; i++) {
    const v = refractiveIndex(model, wavelengths[i] as number);
    n[i] = v.n;
    k[i] = v.k;
    if (v.extrapolated) extrapolated++;
    if (v.outOfRange) outOfRange++;
  }
  return { n, k, extrapolated, outOfRange };
}

/**
 * Refuse optical constants that would poison a computation: n must be finite and 0 < n ≤
 * {@link MAX_INDEX}, k finite and 0 ≤ k ≤ {@link MAX_INDEX}, at every wavelength of the grid.
 *
 * @param materialId  named in the message
 * @throws RangeError naming the material, its model kind, the wavelength (nm) and the value
 */
export function assertPhysicalIndex(
  materialId: string,
  model: MaterialModel,
  wavelengths: ArrayLike<number>,
  table: { n: ArrayLike<number>; k: ArrayLike<number> },
): void {
  for (let i = 0; i < wavelengths.length; i++) {
    const n = table.n[i] as number;
    const k = table.k[i] as number;
    const bad =
      !Number.isFinite(n) || !(n > 0) || n > MAX_INDEX
        ? `n = ${String(n)} (expected finite, 0 < n ≤ ${MAX_INDEX})`
        : !Number.isFinite(k) || !(k >= 0) || k > MAX_INDEX
          ? `k = ${String(k)} (expected finite, 0 ≤ k ≤ ${MAX_INDEX})`
          : null;
    if (bad !== null) {
      throw new RangeError(
        `material "${materialId}" (${model.kind} model) gives ${bad} at ${String(wavelengths[i])} nm`,
      );
    }
  }
}
