/**
 * What a chart or a record shows about one spec band, computed by the same evaluation as the verdict:
 * the band's curves at its own conditions, its violation points, R/T against angle at one wavelength,
 * the band in ISO 9211 style wording, and CSV export of computed spectra.
 */
import { computeSpectrumAtAngles } from "../core/spectrum.ts";
import type { Design } from "../core/index.ts";
import { coneHalfAngleDeg } from "../core/spectrum.ts";
import { bandConditionsText } from "./spec-conditions.ts";
import { bandLimit, createSpecEvaluator, parseSpecMask, SpecColourSchema } from "./spec.ts";
import type {
  BandOutcome,
  SpecBand,
  SpecBandInput,
  SpecColourInput,
  SpecMaskInput,
  WorstPoint,
} from "./spec.ts";
import { parseWith } from "./validate.ts";

/** Largest display grid of {@link bandView}. */
export const MAX_VIEW_POINTS = 4001;

/** One curve of a band view, in band units (percent, or OD). */
export interface BandCurve {
  /** e.g. "lowest over 0–10°, s" or "f/2 cone average, unpolarized" */
  label: string;
  polarization: "s" | "p" | "u";
  /** which side of an angle-range envelope this is, when it is one */
  side?: "lowest" | "highest";
  values: number[];
}

/** Result of {@link bandView}. */
export interface BandView {
  id: string;
  quantity: SpecBand["quantity"];
  requirement: SpecBand["requirement"];
  /** limit in band units (value ∓ tolerance) */
  limit: number;
  /** the band's conditions in words ("0–10°, s and p each") */
  conditions: string;
  /** a chart title: band id or label, quantity and conditions */
  title: string;
  /** display wavelengths (nm) of `curves` */
  wavelengths: number[];
  curves: BandCurve[];
  /** the band's outcome, from the same evaluation as every other verdict (evaluateSpec) */
  outcome: BandOutcome;
  /** samples of the band outside the limit (min/max bands) or non-finite, from that same evaluation */
  violations: WorstPoint[];
}

/** Options of {@link bandView}: the display grid (nm); default the band's own samples. */
export interface BandViewOptions {
  start?: number;
  stop?: number;
  points?: number;
}

const polName = { s: "s", p: "p", u: "unpolarized" } as const;

/**
 * The curves of band `bandId` of a mask at the band's conditions, over a display grid, and the band's
 * violation points from the verdict's own evaluation:
 * - an angle range: its envelope, lowest and highest value over the range per wavelength, per polarization;
 * - a cone or an angle average: the averaged curve per polarization;
 * - "s and p each": one curve (or envelope) for s and one for p.
 * The curves are computed by the spec evaluator itself (a copy of the band over the display grid), so they
 * agree with the verdict wherever the grids meet.
 * @throws RangeError for an unknown band id or a bad grid
 */
export function bandView(
  design: Design,
  maskInput: SpecMaskInput,
  bandId: string,
  options: BandViewOptions = {},
): BandView {
  const mask = parseSpecMask(maskInput);
  const b = mask.bands.findIndex((x) => x.id === bandId);
  const band = mask.bands[b];
  if (!band) {
    if ((mask.colour ?? []).some((c) => c.id === bandId))
      throw new RangeError(
        `bandId: ${JSON.stringify(bandId)} is a colour requirement, which has no curve (its outcome carries the colour)`,
      );
    throw new RangeError(`bandId: no band ${JSON.stringify(bandId)} in the mask`);
  }
  // the verdict: the whole mask, as evaluateSpec does
  const ev = createSpecEvaluator(design, mask);
  const outcomes = ev.evaluate(ev.nominalThicknesses);
  const outcome = outcomes[b] as BandOutcome;
  const plan = ev.bands[b]!;
  const limit = bandLimit(band);
  const violations = ev.violations(b);

  // display grid
  const start = options.start ?? band.start;
  const stop = options.stop ?? band.stop;
  const points =
    options.points ??
    (options.start === undefined && options.stop === undefined ? plan.wavelengths.length : 401);
  if (!(start > 0 && stop >= start && Number.isFinite(stop)))
    throw new RangeError(`start, stop: expected 0 < start ≤ stop nm, got ${start}, ${stop}`);
  if (!(Number.isInteger(points) && points >= 1 && points <= MAX_VIEW_POINTS)) {
    throw new RangeError(`points: expected an integer 1–${MAX_VIEW_POINTS}, got ${points}`);
  }
  const wavelengths =
    options.start === undefined && options.stop === undefined && options.points === undefined
      ? [...plan.wavelengths]
      : Array.from({ length: points }, (_, i) =>
          points === 1 ? start : start + ((stop - start) * i) / (points - 1),
        );
  const pols: ("s" | "p" | "u")[] = band.polarization === "sp" ? ["s", "p"] : [band.polarization];
  const envelope =
    band.angleRange !== undefined &&
    band.angleAverage !== true &&
    band.angleRange.toDeg > band.angleRange.fromDeg;
  const sides: ("min" | "max")[] = envelope ? ["min", "max"] : ["min"];
  const where = bandConditionsText({ ...band, polarization: "u" }).replace(/, unpolarized$/, "");
  const curves: BandCurve[] = [];
  const step =
    wavelengths.length > 1
      ? (wavelengths[wavelengths.length - 1]! - wavelengths[0]!) / (wavelengths.length - 1)
      : undefined;
  for (const pol of pols) {
    for (const side of sides) {
      const copy: SpecBand = {
        ...band,
        id: `${band.id}/${pol}/${side}`,
        start: wavelengths[0]!,
        stop: wavelengths[wavelengths.length - 1]!,
        polarization: pol,
        requirement: side,
      };
      if (step !== undefined) copy.step = step;
      else delete copy.step;
      const one = createSpecEvaluator(design, { bands: [copy] });
      one.compute(one.nominalThicknesses);
      const out = new Float64Array(one.bands[0]!.wavelengths.length);
      one.bandValues(0, out);
      const label = envelope
        ? `${side === "min" ? "lowest" : "highest"} over ${where}, ${polName[pol]}`
        : `${where}, ${polName[pol]}`;
      const curve: BandCurve = {
        label,
        polarization: pol,
        values: Array.from(out).slice(0, wavelengths.length),
      };
      if (envelope) curve.side = side === "min" ? "lowest" : "highest";
      curves.push(curve);
    }
  }
  const conditions = bandConditionsText(band);
  return {
    id: band.id,
    quantity: band.quantity,
    requirement: band.requirement,
    limit,
    conditions,
    title: `${band.label ?? band.id}: ${band.quantity} at ${conditions}`,
    wavelengths,
    curves,
    outcome,
    violations,
  };
}

/** R, T, A (fractions) against the angle of incidence at one wavelength, s, p and unpolarized. */
export interface AngleScan {
  wavelength: number;
  anglesDeg: number[];
  s: { R: number[]; T: number[]; A: number[] };
  p: { R: number[]; T: number[]; A: number[] };
  u: { R: number[]; T: number[]; A: number[] };
}

/**
 * Reflectance and transmittance against angle at one wavelength (nm), angles in degrees in the incident
 * medium from `fromDeg` to `toDeg` (< 90) in `points` steps.
 */
export function angleScan(
  design: Design,
  wavelength: number,
  fromDeg = 0,
  toDeg = 80,
  points = 161,
): AngleScan {
  if (!(Number.isInteger(points) && points >= 2 && points <= 2001))
    throw new RangeError(`points: expected an integer 2–2001, got ${points}`);
  if (!(fromDeg >= 0 && toDeg > fromDeg && toDeg < 90))
    throw new RangeError(`angles: expected 0 ≤ from < to < 90 degrees, got ${fromDeg}–${toDeg}`);
  const anglesDeg = Array.from(
    { length: points },
    (_, i) => fromDeg + ((toDeg - fromDeg) * i) / (points - 1),
  );
  const r = computeSpectrumAtAngles(design, wavelength, anglesDeg);
  const u = {
    R: r.s.R.map((v, i) => 0.5 * (v + r.p.R[i]!)),
    T: r.s.T.map((v, i) => 0.5 * (v + r.p.T[i]!)),
    A: r.s.A.map((v, i) => 0.5 * (v + r.p.A[i]!)),
  };
  return { wavelength, anglesDeg, s: r.s, p: r.p, u };
}

/** Neutralise a CSV cell that a spreadsheet would run as a formula (leading =, +, -, @, tab, CR). */
function csvCell(text: string): string {
  const t = /^[=+\-@\t\r]/.test(text) ? `'${text}` : text;
  return /[",\n\r]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t;
}

/**
 * CSV text of computed spectra: a header line, then one line per wavelength. Numbers are written with
 * up to 10 significant digits (non-finite values as empty cells).
 * @param columns name → values (same length as `wavelengths`)
 */
export function spectrumToCsv(
  wavelengths: ArrayLike<number>,
  columns: Record<string, ArrayLike<number>>,
  xName = "wavelength_nm",
): string {
  const names = Object.keys(columns);
  for (const n of names) {
    if (columns[n]!.length !== wavelengths.length) {
      throw new RangeError(`columns.${n}: expected ${wavelengths.length} values, got ${columns[n]!.length}`);
    }
  }
  const num = (v: number): string => (Number.isFinite(v) ? String(Number(v.toPrecision(10))) : "");
  const lines = [[xName, ...names].map(csvCell).join(",")];
  for (let i = 0; i < wavelengths.length; i++) {
    lines.push([num(wavelengths[i] as number), ...names.map((n) => num(columns[n]![i] as number))].join(","));
  }
  return lines.join("\n") + "\n";
}

const quantitySymbol = { R: "R", T: "T", A: "A", OD: "OD" } as const;
const quantityWords = {
  R: "reflectance",
  T: "transmittance",
  A: "absorptance",
  OD: "optical density",
} as const;
const f = (x: number): string => String(Math.round(x * 1000) / 1000);

/**
 * A band in the wording of an ISO 9211 style coating specification: quantity, wavelength range, angle of
 * incidence (single, range or cone), polarization and requirement, e.g.
 * "Transmittance: Tave ≥ 90 % over 1062–1066 nm; cone f/2 (half-angle 14.48°) about 0°; unpolarized".
 */
export function describeBandIso(bandInput: SpecBandInput): string {
  const band = parseSpecMask({ bands: [bandInput] }).bands[0]!;
  const q = quantitySymbol[band.quantity];
  const unit = band.quantity === "OD" ? "" : " %";
  const rel = band.requirement === "min" || band.requirement === "avgMin" ? "≥" : "≤";
  const sym = band.requirement === "avgMin" || band.requirement === "avgMax" ? `${q}ave` : q;
  const every = band.requirement === "min" || band.requirement === "max" ? " at every wavelength" : "";
  const tol = band.tolerance ? ` (tolerance ${f(band.tolerance)}${unit})` : "";
  const range =
    band.start === band.stop ? `at ${f(band.start)} nm` : `over ${f(band.start)}–${f(band.stop)} nm`;
  let angle: string;
  if (band.cone) {
    const half = coneHalfAngleDeg(band.cone);
    angle =
      "fNumber" in band.cone
        ? `cone f/${f(band.cone.fNumber)} (half-angle ${f(half)}°) about ${f(band.angleDeg)}°`
        : `cone of half-angle ${f(half)}° about ${f(band.angleDeg)}°`;
  } else if (band.angleRange && band.angleRange.toDeg > band.angleRange.fromDeg) {
    const r = band.angleRange;
    angle = band.angleAverage
      ? `angle of incidence averaged over ${f(r.fromDeg)}–${f(r.toDeg)}°`
      : `angle of incidence ${f(r.fromDeg)}–${f(r.toDeg)}° (every angle)`;
  } else {
    angle = `angle of incidence ${f(band.angleRange ? band.angleRange.fromDeg : band.angleDeg)}°`;
  }
  const pol = { s: "s-polarized", p: "p-polarized", u: "unpolarized", sp: "s and p polarization each" }[
    band.polarization
  ];
  const name = quantityWords[band.quantity];
  return `${name[0]!.toUpperCase()}${name.slice(1)}: ${sym} ${rel} ${f(band.value)}${unit}${tol}${every} ${range}; ${angle}; ${pol}`;
}

const observerIso = {
  "2": "CIE 1931 standard colorimetric observer (2°)",
  "10": "CIE 1964 standard colorimetric observer (10°)",
} as const;
const c4 = (x: number): string => String(Math.round(x * 10000) / 10000);
const neg = (t: string): string => t.replace(/^-/, "−");

/**
 * A colour requirement in the wording of an ISO 9211 style coating specification: quantity (colour of the
 * reflected or transmitted light), observer, illuminant, angle of incidence, polarization and requirement, e.g.
 * "Colour of reflected light: CIE 1931 standard colorimetric observer (2°), CIE illuminant D65; angle of
 * incidence 0°; unpolarized; ΔE*ab (CIEDE2000) ≤ 2 from L* = 50, a* = 0, b* = 0". The colour is computed
 * over 380–780 nm in 5 nm steps (CIE 015:2018).
 * @throws RangeError naming the field for an invalid requirement
 */
export function describeColourIso(input: SpecColourInput): string {
  const c = parseWith(SpecColourSchema, input, "colour");
  const lim = c.limit;
  const range = (name: string, r: readonly [number, number]): string =>
    `${neg(c4(r[0]))} ≤ ${name} ≤ ${neg(c4(r[1]))}`;
  const requirement =
    lim.type === "box-xy"
      ? `chromaticity ${range("x", lim.x)} and ${range("y", lim.y)}`
      : lim.type === "box-ab"
        ? `CIELAB ${range("a*", lim.a)} and ${range("b*", lim.b)}${lim.L ? ` and ${range("L*", lim.L)}` : ""}`
        : `ΔE*ab (${lim.formula}) ≤ ${c4(lim.max)} from L* = ${neg(c4(lim.target.L))}, a* = ${neg(c4(lim.target.a))}, b* = ${neg(c4(lim.target.b))}`;
  const pol = { s: "s-polarized", p: "p-polarized", u: "unpolarized" }[c.polarization];
  return `Colour of ${c.quantity === "R" ? "reflected" : "transmitted"} light: ${observerIso[c.observer]}, CIE illuminant ${c.illuminant}; angle of incidence ${f(c.angleDeg)}°; ${pol}; ${requirement}`;
}
