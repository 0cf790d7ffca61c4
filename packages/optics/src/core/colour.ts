/**
 * Colour of reflected and transmitted light: CIE XYZ, chromaticity (x, y) and CIELAB (L*, a*, b*)
 * under illuminant D65 or A for the CIE 1931 2° or CIE 1964 10° observer (CIE 015:2018
 * *Colorimetry*, sections 7 and 8), and colour requirements of a spec mask (a box in x, y or a*, b*,
 * or a ΔE*ab limit against a target, CIE76 or CIEDE2000).
 *
 * Method: tristimulus values by summation at 5 nm from 380 to 780 nm (CIE 015, 7.2),
 * X = k Σ S(λ) x̄(λ) ρ(λ) Δλ with k = 100 / Σ S(λ) ȳ(λ) Δλ, so a perfect reflector has Y = 100.
 * CIELAB is taken relative to the white of the same illuminant and observer (Xn, Yn, Zn), so the
 * perfect reflector is exactly (100, 0, 0). XYZ → L*a*b* and CIEDE2000 come from culori (a
 * well-kept colour library); the spectral sums and the tables (cie-tables.ts) are ours.
 *
 * Spectra are fractions 0..1 (R or T of the coated part, as computeSpectrum gives them).
 */
import { clampRgb, converter, differenceCiede2000, differenceEuclidean, formatHex, type Lab65 } from "culori";
import { z } from "zod";
import {
  CIE1931_X,
  CIE1931_Y,
  CIE1931_Z,
  CIE1964_X,
  CIE1964_Y,
  CIE1964_Z,
  CIE_D65,
  CIE_ROWS,
  CIE_START_NM,
  CIE_STEP_NM,
} from "./cie-tables.ts";
import type { Design } from "./design.ts";
import { computeSpectrum } from "./spectrum.ts";

/** Standard observer: CIE 1931 2° ("2") or CIE 1964 10° ("10"). */
export const ObserverSchema = z.enum(["2", "10"], {
  error: 'expected "2" (CIE 1931 2°) or "10" (CIE 1964 10°)',
});
/** Standard observer id. */
export type Observer = z.output<typeof ObserverSchema>;
/** CIE standard illuminant: D65 (average daylight) or A (incandescent, 2856 K). */
export const IlluminantSchema = z.enum(["D65", "A"], { error: 'expected "D65" or "A"' });
/** Illuminant id. */
export type Illuminant = z.output<typeof IlluminantSchema>;

/** The wavelengths (nm) colour is computed at: 380, 385, …, 780 (81 values). */
export const COLOUR_WAVELENGTHS: Float64Array = (() => {
  const w = new Float64Array(CIE_ROWS);
  for (let i = 0; i < CIE_ROWS; i++) w[i] = CIE_START_NM + i * CIE_STEP_NM;
  return w;
})();

/**
 * Relative spectral power of CIE illuminant A at λ (nm), defined by the CIE through Planck's law
 * with c2 = 1.435e7 nm·K and T = 2848 K (the 1931 value of c2, hence 2856 K on today's scale),
 * normalised to 100 at 560 nm (CIE 015:2018, 4.1; ISO 11664-2).
 */
export function illuminantA(wavelengthNm: number): number {
  const c = 1.435e7 / 2848;
  return 100 * (560 / wavelengthNm) ** 5 * (Math.expm1(c / 560) / Math.expm1(c / wavelengthNm));
}

interface Weights {
  wx: Float64Array;
  wy: Float64Array;
  wz: Float64Array;
  white: { X: number; Y: number; Z: number };
}

const weightCache = new Map<string, Weights>();

/** Weighting factors S·x̄·k etc. per 5 nm row, so that X = Σ w_x ρ; cached per illuminant/observer. */
function weights(illuminant: Illuminant, observer: Observer): Weights {
  const key = illuminant + "/" + observer;
  const hit = weightCache.get(key);
  if (hit) return hit;
  const [xb, yb, zb] =
    observer === "2" ? [CIE1931_X, CIE1931_Y, CIE1931_Z] : [CIE1964_X, CIE1964_Y, CIE1964_Z];
  const wx = new Float64Array(CIE_ROWS);
  const wy = new Float64Array(CIE_ROWS);
  const wz = new Float64Array(CIE_ROWS);
  let norm = 0;
  for (let i = 0; i < CIE_ROWS; i++) {
    const S = illuminant === "D65" ? CIE_D65[i]! : illuminantA(COLOUR_WAVELENGTHS[i]!);
    wx[i] = S * xb[i]!;
    wy[i] = S * yb[i]!;
    wz[i] = S * zb[i]!;
    norm += wy[i]!;
  }
  const k = 100 / norm;
  let X = 0;
  let Y = 0;
  let Z = 0;
  for (let i = 0; i < CIE_ROWS; i++) {
    wx[i] = wx[i]! * k;
    wy[i] = wy[i]! * k;
    wz[i] = wz[i]! * k;
    X += wx[i]!;
    Y += wy[i]!;
    Z += wz[i]!;
  }
  const w = { wx, wy, wz, white: { X, Y, Z } };
  weightCache.set(key, w);
  return w;
}

/** Colour coordinates of a stimulus. */
export interface ColourCoordinates {
  /** tristimulus values, perfect reflector Y = 100 */
  X: number;
  Y: number;
  Z: number;
  /** CIE chromaticity coordinates */
  x: number;
  y: number;
  /** CIELAB relative to the illuminant's white for the same observer */
  L: number;
  a: number;
  b: number;
  illuminant: Illuminant;
  observer: Observer;
}

/** Options for the colour of a spectrum. */
export interface ColourOptions {
  illuminant?: Illuminant;
  observer?: Observer;
}

const toLab65 = converter("lab65");
// culori's lab65 divides by its D65 white; scaling X/Xn, Z/Zn onto that white makes the result
// CIELAB relative to any white (the L*a*b* formulas use only the ratios X/Xn, Y/Yn, Z/Zn)
const CULORI_D65 = { X: 0.3127 / 0.329, Y: 1, Z: (1 - 0.3127 - 0.329) / 0.329 };

/** CIELAB of tristimulus values relative to a white (Xn, Yn, Zn), via culori (CIE 015:2018, 8.2.1). */
export function labFromXyz(
  xyz: { X: number; Y: number; Z: number },
  white: { X: number; Y: number; Z: number },
): { L: number; a: number; b: number } {
  const lab = toLab65({
    mode: "xyz65",
    x: (xyz.X / white.X) * CULORI_D65.X,
    y: (xyz.Y / white.Y) * CULORI_D65.Y,
    z: (xyz.Z / white.Z) * CULORI_D65.Z,
  });
  return { L: lab.l, a: lab.a, b: lab.b };
}

const toRgb = converter("rgb");

/**
 * An sRGB swatch (hex, e.g. "#c8a2e0") of a colour, for display only: the tristimulus values are
 * scaled to the D65 white (the eye adapted to the illuminant), converted to sRGB by culori
 * (IEC 61966-2-1) and clipped to the gamut; `inGamut` says whether clipping was needed.
 * A reflectance of a few percent shows dark: pass `normalise: true` to scale Y to 100 first and
 * show the hue alone.
 */
export function colourSwatch(
  colour: ColourCoordinates,
  normalise = false,
): { hex: string; inGamut: boolean } {
  const w = weights(colour.illuminant, colour.observer).white;
  const scale = normalise && colour.Y > 0 ? 100 / colour.Y : 1;
  const rgb = toRgb({
    mode: "xyz65",
    x: ((colour.X * scale) / w.X) * CULORI_D65.X,
    y: ((colour.Y * scale) / w.Y) * CULORI_D65.Y,
    z: ((colour.Z * scale) / w.Z) * CULORI_D65.Z,
  });
  const eps = 1e-6;
  const inGamut = [rgb.r, rgb.g, rgb.b].every((v) => v >= -eps && v <= 1 + eps);
  return { hex: formatHex(clampRgb(rgb)) ?? "#000000", inGamut };
}

/**
 * Colour of a spectrum sampled on {@link COLOUR_WAVELENGTHS} (81 values, 380–780 nm every 5 nm,
 * fractions 0..1): the fast path for studies that evaluate their stack on that grid.
 *
 * @throws RangeError when the array is not 81 long or holds a non-finite value (naming λ)
 */
export function colourFromSamples(values: ArrayLike<number>, options: ColourOptions = {}): ColourCoordinates {
  const illuminant = options.illuminant ?? "D65";
  const observer = options.observer ?? "2";
  if (values.length !== CIE_ROWS) {
    throw new RangeError(
      `colour: expected ${CIE_ROWS} samples at 380–780 nm every 5 nm, got ${values.length}`,
    );
  }
  const w = weights(illuminant, observer);
  let X = 0;
  let Y = 0;
  let Z = 0;
  for (let i = 0; i < CIE_ROWS; i++) {
    const v = values[i] as number;
    if (!Number.isFinite(v)) {
      throw new RangeError(
        `colour: the spectrum is not finite at ${COLOUR_WAVELENGTHS[i]} nm (got ${String(v)})`,
      );
    }
    X += w.wx[i]! * v;
    Y += w.wy[i]! * v;
    Z += w.wz[i]! * v;
  }
  const sum = X + Y + Z;
  // a black stimulus has no chromaticity; report the white's so that the box tests stay defined
  const ref = sum > 0 ? { X, Y, Z, s: sum } : { ...w.white, s: w.white.X + w.white.Y + w.white.Z };
  const lab = labFromXyz({ X, Y, Z }, w.white);
  return { X, Y, Z, x: ref.X / ref.s, y: ref.Y / ref.s, ...lab, illuminant, observer };
}

/**
 * Colour of a spectrum on any wavelength grid (nm, increasing), resampled linearly onto
 * 380–780 nm at 5 nm. Where the grid does not reach an end of 380–780 nm the nearest value is
 * held (CIE 015 practice for missing ends) and a warning says so.
 *
 * @throws RangeError for unsorted or non-finite input, or a grid that does not cover 430–700 nm (where
 *   the colour-matching functions carry almost all their weight)
 */
export function colourOfSpectrum(
  wavelengthsNm: ArrayLike<number>,
  values: ArrayLike<number>,
  options: ColourOptions = {},
): ColourCoordinates & { warnings: string[] } {
  const n = wavelengthsNm.length;
  if (n === 0 || values.length !== n) {
    throw new RangeError(`colour: expected as many values as wavelengths (${n}), got ${values.length}`);
  }
  for (let i = 1; i < n; i++) {
    if (!((wavelengthsNm[i] as number) > (wavelengthsNm[i - 1] as number))) {
      throw new RangeError(
        `colour: wavelengths must increase, got ${wavelengthsNm[i - 1]} then ${wavelengthsNm[i]} nm`,
      );
    }
  }
  const lo = wavelengthsNm[0] as number;
  const hi = wavelengthsNm[n - 1] as number;
  const warnings: string[] = [];
  if (lo > 430 || hi < 700) {
    throw new RangeError(
      `colour: the spectrum must cover at least 430–700 nm of 380–780 nm, got ${lo}–${hi} nm`,
    );
  }
  if (lo > 380 || hi < 780) {
    warnings.push(`colour: spectrum covers ${lo}–${hi} nm; end values held to 380–780 nm (CIE 015 practice)`);
  }
  const samples = new Float64Array(CIE_ROWS);
  let j = 0;
  for (let i = 0; i < CIE_ROWS; i++) {
    const lam = COLOUR_WAVELENGTHS[i]!;
    if (lam <= lo) samples[i] = values[0] as number;
    else if (lam >= hi) samples[i] = values[n - 1] as number;
    else {
      while ((wavelengthsNm[j + 1] as number) < lam) j++;
      const a = wavelengthsNm[j] as number;
      const b = wavelengthsNm[j + 1] as number;
      const t = (lam - a) / (b - a);
      samples[i] = (values[j] as number) * (1 - t) + (values[j + 1] as number) * t;
    }
  }
  return { ...colourFromSamples(samples, options), warnings };
}

/** Options for {@link colourOfDesign}. */
export interface DesignColourOptions extends ColourOptions {
  /** reflected ("R") or transmitted ("T") light */
  quantity: "R" | "T";
  /** angle of incidence in the incident medium, degrees (default 0) */
  angleDeg?: number;
  /** polarization (default unpolarized) */
  polarization?: "s" | "p" | "u";
}

/**
 * Colour of the light a design reflects or transmits, computed on 380–780 nm at 5 nm with
 * {@link computeSpectrum} (N = n − ik; back surface as the design says).
 */
export function colourOfDesign(
  design: Design,
  options: DesignColourOptions,
): ColourCoordinates & { warnings: string[] } {
  const sp = computeSpectrum(design, { wavelengths: COLOUR_WAVELENGTHS, angleDeg: options.angleDeg ?? 0 });
  const pol = sp[options.polarization ?? "u"];
  const values = options.quantity === "R" ? pol.R : pol.T;
  return { ...colourFromSamples(values, options), warnings: [...sp.warnings] };
}

/** ΔE*ab between two CIELAB colours: CIE76 (Euclidean) or CIEDE2000 (via culori). */
export function deltaE(
  formula: "CIE76" | "CIEDE2000",
  reference: { L: number; a: number; b: number },
  sample: { L: number; a: number; b: number },
): number {
  const A: Lab65 = { mode: "lab65", l: reference.L, a: reference.a, b: reference.b };
  const B: Lab65 = { mode: "lab65", l: sample.L, a: sample.a, b: sample.b };
  return formula === "CIE76" ? cie76(A, B) : ciede2000(A, B);
}
const cie76 = differenceEuclidean("lab65");
const ciede2000 = differenceCiede2000();

const finite = z
  .number({ error: "expected a number" })
  .refine(Number.isFinite, { error: "expected a finite number" });
const interval = z
  .tuple([finite, finite], { error: "expected [min, max]" })
  .refine((r) => r[0] <= r[1], { error: "expected [min, max] with min ≤ max" });

/** A colour box in chromaticity: x ∈ [min, max] and y ∈ [min, max]. */
export const ColourBoxXySchema = z.object({ type: z.literal("box-xy"), x: interval, y: interval });
/** A colour box in CIELAB: a* ∈ [min, max], b* ∈ [min, max], optionally L* ∈ [min, max]. */
export const ColourBoxLabSchema = z.object({
  type: z.literal("box-ab"),
  a: interval,
  b: interval,
  L: interval.optional(),
});
/** A ΔE*ab limit against a target colour (CIE76 or CIEDE2000). */
export const ColourDeltaESchema = z.object({
  type: z.literal("delta-e"),
  formula: z.enum(["CIE76", "CIEDE2000"]),
  target: z.object({ L: finite, a: finite, b: finite }),
  max: z.number().positive({ error: "expected a ΔE limit > 0" }),
});

/**
 * A colour requirement of a spec mask: the colour of reflected or transmitted light under an
 * illuminant and observer, at one angle and polarization, must lie in a box or within ΔE of a target.
 */
export const ColourRequirementSchema = z.object({
  /** optional tag, "colour" (a spec mask keeps colour requirements in their own list, `colour`) */
  kind: z.literal("colour").optional(),
  label: z.string().optional(),
  quantity: z.enum(["R", "T"], { error: 'expected "R" or "T"' }),
  illuminant: IlluminantSchema.default("D65"),
  observer: ObserverSchema.default("2"),
  angleDeg: z
    .number({ error: "expected an angle in degrees" })
    .min(0, { error: "expected an angle 0 ≤ θ < 90°" })
    .lt(90, { error: "expected an angle 0 ≤ θ < 90°" })
    .default(0),
  polarization: z.enum(["s", "p", "u"], { error: 'expected "s", "p" or "u"' }).default("u"),
  limit: z.discriminatedUnion("type", [ColourBoxXySchema, ColourBoxLabSchema, ColourDeltaESchema]),
});
/** A colour requirement (defaults applied). */
export type ColourRequirement = z.output<typeof ColourRequirementSchema>;
/** A colour requirement as written. */
export type ColourRequirementInput = z.input<typeof ColourRequirementSchema>;

/** Outcome of a colour requirement. */
export interface ColourVerdict {
  pass: boolean;
  /**
   * how far inside the limit the colour is (negative: outside): for a box the smallest distance
   * to an edge in the box's own units (x, y or a*, b*, L*), for ΔE the limit minus ΔE
   */
  margin: number;
  /** the colour found */
  colour: ColourCoordinates;
  /** ΔE against the target (delta-e requirements only) */
  deltaE?: number;
  /** plain-language reason when it fails */
  reason?: string;
}

function boxMargin(v: number, [lo, hi]: readonly [number, number]): number {
  return Math.min(v - lo, hi - v);
}

/** The coordinate that decides a colour verdict: nearest its limit (or furthest past it), or ΔE. */
export type ColourLimiting = "x" | "y" | "L" | "a" | "b" | "deltaE";

/** How a colour stands against a limit (see {@link judgeColour}). */
export interface ColourJudgement {
  /** limit − distance, in the limit's own units (x, y; L*, a*, b*; ΔE); negative or NaN: outside */
  margin: number;
  /** which coordinate sets the margin */
  limiting: ColourLimiting;
  /** value of that coordinate (ΔE for a ΔE limit) */
  value: number;
  /** ΔE against the target, ΔE limits only */
  deltaE?: number;
}

/**
 * Judge colour coordinates against the limit of a colour requirement, without parsing (the spec
 * evaluator calls this once per trial): for a box the smallest distance to an edge over its
 * coordinates, for ΔE the limit minus ΔE (CIE76 or CIEDE2000 via culori). A NaN coordinate gives a
 * NaN margin.
 */
export function judgeColour(limit: ColourRequirement["limit"], colour: ColourCoordinates): ColourJudgement {
  if (limit.type === "delta-e") {
    const dE = deltaE(limit.formula, limit.target, colour);
    return { margin: limit.max - dE, limiting: "deltaE", value: dE, deltaE: dE };
  }
  const axes: [ColourLimiting, number, readonly [number, number]][] =
    limit.type === "box-xy"
      ? [
          ["x", colour.x, limit.x],
          ["y", colour.y, limit.y],
        ]
      : [
          ["a", colour.a, limit.a],
          ["b", colour.b, limit.b],
          ...(limit.L
            ? ([["L", colour.L, limit.L]] as [ColourLimiting, number, readonly [number, number]][])
            : []),
        ];
  let best: ColourJudgement = { margin: Infinity, limiting: axes[0]![0], value: axes[0]![1] };
  for (const [name, v, range] of axes) {
    const m = boxMargin(v, range);
    if (Number.isNaN(m)) return { margin: Number.NaN, limiting: name, value: v };
    if (m < best.margin) best = { margin: m, limiting: name, value: v };
  }
  return best;
}

/** The reason a judged colour fails, in words (undefined when it passes). */
export function colourFailureReason(
  limit: ColourRequirement["limit"],
  colour: ColourCoordinates,
  judged: ColourJudgement,
): string | undefined {
  if (!Number.isFinite(judged.margin)) return "the colour is not finite";
  if (judged.margin >= 0) return undefined;
  return limit.type === "delta-e"
    ? `ΔE (${limit.formula}) = ${judged.value.toFixed(2)} exceeds ${limit.max}`
    : limit.type === "box-xy"
      ? `(x, y) = (${colour.x.toFixed(4)}, ${colour.y.toFixed(4)}) outside the box`
      : `(L*, a*, b*) = (${colour.L.toFixed(2)}, ${colour.a.toFixed(2)}, ${colour.b.toFixed(2)}) outside the box`;
}

/**
 * Judge a colour against a requirement. Pass a {@link ColourCoordinates} already computed for the
 * requirement's quantity/illuminant/observer, or a design (the colour is then computed with
 * {@link colourOfDesign} at the requirement's angle and polarization). A non-finite colour never
 * passes.
 */
export function evaluateColourRequirement(
  requirementInput: ColourRequirementInput,
  subject: Design | ColourCoordinates,
): ColourVerdict {
  const req = ColourRequirementSchema.parse(requirementInput);
  let colour: ColourCoordinates;
  if ("layers" in subject) {
    try {
      colour = colourOfDesign(subject, {
        quantity: req.quantity,
        illuminant: req.illuminant,
        observer: req.observer,
        angleDeg: req.angleDeg,
        polarization: req.polarization,
      });
    } catch (e) {
      if (!(e instanceof RangeError) || !e.message.startsWith("colour: the spectrum is not finite")) throw e;
      const nan = Number.NaN;
      const c = {
        X: nan,
        Y: nan,
        Z: nan,
        x: nan,
        y: nan,
        L: nan,
        a: nan,
        b: nan,
        illuminant: req.illuminant,
        observer: req.observer,
      };
      return { pass: false, margin: -Infinity, colour: c, reason: e.message };
    }
  } else {
    colour = subject;
  }
  const judged = judgeColour(req.limit, colour);
  if (!Number.isFinite(judged.margin)) {
    return { pass: false, margin: -Infinity, colour, reason: "the colour is not finite" };
  }
  const verdict: ColourVerdict = { pass: judged.margin >= 0, margin: judged.margin, colour };
  if (judged.deltaE !== undefined) verdict.deltaE = judged.deltaE;
  const reason = colourFailureReason(req.limit, colour, judged);
  if (reason) verdict.reason = reason;
  return verdict;
}
