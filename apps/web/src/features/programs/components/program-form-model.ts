// The program form's values (text as typed), their checks and the conversion to the API body.
import { z } from "zod";
import { ErrorModelSchema, MAX_TRIALS, SpecBandSchema, SpecColourSchema } from "@stackproof/optics";
import type { ErrorModel, SpecBand, SpecColour } from "@stackproof/optics";
import type { Program } from "../api/get-program.ts";
import type { ProgramBody } from "../api/save-program.ts";

/** The smallest minimum of evidence trials the API accepts. */
export const MIN_EVIDENCE_TRIALS = 100;

const quantities = ["R", "T", "A", "OD"] as const;
const polarizations = ["s", "p", "u", "sp"] as const;
const requirements = ["min", "max", "avgMin", "avgMax"] as const;

const bandValues = z.object({
  id: z.string(),
  label: z.string(),
  start: z.string(),
  stop: z.string(),
  /** sampling step (nm); empty: 1 nm, at most 501 points */
  step: z.string(),
  quantity: z.enum(quantities),
  polarization: z.enum(polarizations),
  /** one angle of incidence, an angle range, or a cone of light about a chief ray */
  incidence: z.enum(["single", "range", "cone"]),
  /** the angle of incidence (single), or the cone's chief ray (cone), degrees */
  angleDeg: z.string(),
  rangeFrom: z.string(),
  rangeTo: z.string(),
  /** angle step of the range (degrees); empty: 1° */
  rangeStep: z.string(),
  /** the requirement applies to the average over the angle range instead of every angle */
  angleAverage: z.boolean(),
  coneBy: z.enum(["fNumber", "halfAngle"]),
  /** the cone's f-number or half-angle (degrees), as coneBy says */
  cone: z.string(),
  requirement: z.enum(requirements),
  value: z.string(),
  tolerance: z.string(),
});
export type BandValues = z.infer<typeof bandValues>;

const colourValues = z.object({
  id: z.string(),
  label: z.string(),
  quantity: z.enum(["R", "T"]),
  illuminant: z.enum(["D65", "A"]),
  observer: z.enum(["2", "10"]),
  angleDeg: z.string(),
  polarization: z.enum(["u", "s", "p"]),
  limit: z.enum(["box-xy", "box-ab", "delta-e"]),
  xMin: z.string(),
  xMax: z.string(),
  yMin: z.string(),
  yMax: z.string(),
  aMin: z.string(),
  aMax: z.string(),
  bMin: z.string(),
  bMax: z.string(),
  /** optional L* range of an a* and b* box (both or neither) */
  LMin: z.string(),
  LMax: z.string(),
  formula: z.enum(["CIEDE2000", "CIE76"]),
  targetL: z.string(),
  targetA: z.string(),
  targetB: z.string(),
  deltaE: z.string(),
});
export type ColourValues = z.infer<typeof colourValues>;

// Only the shape here: every check is in the refinement below, so all of them run on every submit
// (zod skips an object's refinements once one of its fields has failed).
const baseValues = z.object({
  name: z.string(),
  customer: z.string(),
  description: z.string(),
  application: z.string(),
  protective: z.boolean(),
  targetYieldPct: z.string(),
  minEvidenceTrials: z.string(),
  confidencePct: z.string(),
  trials: z.string(),
  seed: z.string(),
  relativePct: z.string(),
  absoluteNm: z.string(),
  distribution: z.enum(["normal", "uniform"]),
  truncateSigma: z.string(),
  systematicPct: z.string(),
  indexDriftPct: z.string(),
  indexNoisePct: z.string(),
  bands: z.array(bandValues),
  colour: z.array(colourValues),
});
export type ProgramFormValues = z.infer<typeof baseValues>;

/** "1.5" → 1.5, "" → undefined, anything else → NaN. A decimal comma is accepted. */
export function parseNumber(text: string): number | undefined {
  const t = text.trim().replace(",", ".");
  if (t === "") return undefined;
  const n = Number(t);
  return Number.isFinite(n) ? n : Number.NaN;
}

/** "0.4" (every material) or "Ta2O5 = 0.5, SiO2 = 0.4" (per material) → the error model's per-material value. */
export function parsePerMaterial(text: string): number | Record<string, number> | undefined {
  const t = text.trim();
  if (t === "") return undefined;
  if (!t.includes("=")) return parseNumber(t);
  const out: Record<string, number> = {};
  for (const part of t.split(/[;,](?=\s*[^\d\s])/)) {
    const [k, v, ...rest] = part.split("=");
    const key = k?.trim() ?? "";
    const n = parseNumber(v ?? "");
    if (!key || rest.length > 0 || n === undefined || Number.isNaN(n)) return Number.NaN;
    out[key] = n;
  }
  return out;
}

function formatPerMaterial(v: number | Record<string, number> | undefined): string {
  if (v === undefined) return "";
  if (typeof v === "number") return String(v);
  return Object.entries(v)
    .map(([k, x]) => `${k} = ${x}`)
    .join(", ");
}

const str = (n: number | undefined) => (n === undefined ? "" : String(n));

/** Target yield fraction 0..1 → percent text without float noise (0.95 → "95"). */
export function fractionToPercentText(f: number): string {
  return String(Number((f * 100).toPrecision(12)));
}

export function emptyBand(index: number): BandValues {
  return {
    id: `band-${index + 1}`,
    label: "",
    start: "",
    stop: "",
    step: "",
    quantity: "R",
    polarization: "u",
    incidence: "single",
    angleDeg: "0",
    rangeFrom: "",
    rangeTo: "",
    rangeStep: "",
    angleAverage: false,
    coneBy: "fNumber",
    cone: "",
    requirement: "max",
    value: "",
    tolerance: "",
  };
}

/** A new colour requirement: reflected colour, D65, CIE 1931 2°, 0°, unpolarized, an a* and b* box to fill in. */
export function emptyColour(index: number): ColourValues {
  return {
    id: `colour-${index + 1}`,
    label: "",
    quantity: "R",
    illuminant: "D65",
    observer: "2",
    angleDeg: "0",
    polarization: "u",
    limit: "box-ab",
    xMin: "",
    xMax: "",
    yMin: "",
    yMax: "",
    aMin: "",
    aMax: "",
    bMin: "",
    bMax: "",
    LMin: "",
    LMax: "",
    formula: "CIEDE2000",
    targetL: "",
    targetA: "",
    targetB: "",
    deltaE: "",
  };
}

/** A stored band as form values (every condition shown in its own field). */
export function bandToValues(b: SpecBand): BandValues {
  const r = b.angleRange;
  const cone = b.cone;
  return {
    ...emptyBand(0),
    id: b.id,
    label: b.label ?? "",
    start: String(b.start),
    stop: String(b.stop),
    step: str(b.step),
    quantity: b.quantity,
    polarization: b.polarization,
    incidence: r ? "range" : cone ? "cone" : "single",
    angleDeg: String(b.angleDeg),
    rangeFrom: str(r?.fromDeg),
    rangeTo: str(r?.toDeg),
    rangeStep: str(r?.stepDeg),
    angleAverage: b.angleAverage === true,
    coneBy: cone && "halfAngleDeg" in cone ? "halfAngle" : "fNumber",
    cone: cone ? String("halfAngleDeg" in cone ? cone.halfAngleDeg : cone.fNumber) : "",
    requirement: b.requirement,
    value: String(b.value),
    tolerance: str(b.tolerance),
  };
}

/** A stored colour requirement as form values. */
export function colourToValues(c: SpecColour): ColourValues {
  const v: ColourValues = {
    ...emptyColour(0),
    id: c.id,
    label: c.label ?? "",
    quantity: c.quantity,
    illuminant: c.illuminant,
    observer: c.observer,
    angleDeg: String(c.angleDeg),
    polarization: c.polarization,
    limit: c.limit.type,
  };
  const lim = c.limit;
  if (lim.type === "box-xy")
    Object.assign(v, { xMin: str(lim.x[0]), xMax: str(lim.x[1]), yMin: str(lim.y[0]), yMax: str(lim.y[1]) });
  else if (lim.type === "box-ab")
    Object.assign(v, {
      aMin: str(lim.a[0]),
      aMax: str(lim.a[1]),
      bMin: str(lim.b[0]),
      bMax: str(lim.b[1]),
      LMin: str(lim.L?.[0]),
      LMax: str(lim.L?.[1]),
    });
  else
    Object.assign(v, {
      formula: lim.formula,
      targetL: str(lim.target.L),
      targetA: str(lim.target.a),
      targetB: str(lim.target.b),
      deltaE: str(lim.max),
    });
  return v;
}

export function defaultFormValues(): ProgramFormValues {
  return {
    name: "",
    customer: "",
    description: "",
    application: "",
    protective: false,
    targetYieldPct: "90",
    minEvidenceTrials: "2000",
    confidencePct: "95",
    trials: "2000",
    seed: "stackproof",
    relativePct: "1",
    absoluteNm: "0",
    distribution: "normal",
    truncateSigma: "",
    systematicPct: "",
    indexDriftPct: "",
    indexNoisePct: "",
    bands: [emptyBand(0)],
    colour: [],
  };
}

export function formValuesFromProgram(p: Program): ProgramFormValues {
  const t = p.errorModel.thickness ?? {};
  return {
    name: p.name,
    customer: p.customer,
    description: p.description,
    application: p.application,
    protective: p.protective,
    targetYieldPct: fractionToPercentText(p.targetYield),
    minEvidenceTrials: String(p.minEvidenceTrials ?? 2000),
    confidencePct: fractionToPercentText(p.confidence ?? 0.95),
    trials: String(p.studyDefaults.trials),
    seed: p.studyDefaults.seed,
    relativePct: str(t.relativePct ?? 0),
    absoluteNm: str(t.absoluteNm ?? 0),
    distribution: t.distribution ?? "normal",
    truncateSigma: str(t.truncateSigma),
    systematicPct: formatPerMaterial(p.errorModel.systematicPct),
    indexDriftPct: formatPerMaterial(p.errorModel.indexDriftPct),
    indexNoisePct: str(p.errorModel.indexNoisePct),
    bands: p.specMask.bands.map(bandToValues),
    colour: (p.specMask.colour ?? []).map(colourToValues),
  };
}

/** Error-model paths (as the optics schema and the API name them) → form fields. */
const errorModelFields: Record<string, keyof ProgramFormValues> = {
  "thickness.relativePct": "relativePct",
  "thickness.absoluteNm": "absoluteNm",
  "thickness.distribution": "distribution",
  "thickness.truncateSigma": "truncateSigma",
  systematicPct: "systematicPct",
  indexDriftPct: "indexDriftPct",
  indexNoisePct: "indexNoisePct",
};

/** The band field that shows an issue of the optics band schema at `path` (e.g. ["angleRange", "toDeg"] → "rangeTo"). */
export function bandField(path: readonly (string | number)[]): keyof BandValues {
  const [first, second] = path.map(String);
  switch (first) {
    case "angleRange":
      return second === "fromDeg" ? "rangeFrom" : second === "stepDeg" ? "rangeStep" : "rangeTo";
    case "cone":
      return "cone";
    case "angleAverage":
      return "angleAverage";
    case "id":
    case "label":
    case "start":
    case "stop":
    case "step":
    case "quantity":
    case "polarization":
    case "angleDeg":
    case "requirement":
    case "value":
    case "tolerance":
      return first;
    default:
      return "id";
  }
}

/** The colour field that shows an issue of the optics colour schema at `path` (e.g. ["limit", "x", 1] → "xMax"). */
export function colourField(path: readonly (string | number)[]): keyof ColourValues {
  const [first, second, third] = path.map(String);
  if (first === "limit") {
    if (second === "x" || second === "y" || second === "a" || second === "b" || second === "L")
      return `${second}${third === "1" ? "Max" : "Min"}` as keyof ColourValues;
    if (second === "max") return "deltaE";
    if (second === "formula") return "formula";
    if (second === "target") return third === "a" ? "targetA" : third === "b" ? "targetB" : "targetL";
    return "limit";
  }
  switch (first) {
    case "id":
    case "label":
    case "quantity":
    case "illuminant":
    case "observer":
    case "angleDeg":
    case "polarization":
      return first;
    default:
      return "id";
  }
}

/**
 * The form field a server (or optics schema) issue path belongs to, e.g. "specMask.bands.2.stop" →
 * "bands.2.stop", "specMask.colour.0.limit.x" → "colour.0.xMin", "targetYield" → "targetYieldPct"; null when
 * no field shows it.
 */
export function fieldForPath(path: string): string | null {
  const direct = ["name", "customer", "description", "application", "protective"];
  if (direct.includes(path)) return path;
  if (path === "targetYield") return "targetYieldPct";
  if (path === "minEvidenceTrials") return "minEvidenceTrials";
  if (path === "confidence") return "confidencePct";
  if (path === "studyDefaults.trials") return "trials";
  if (path === "studyDefaults.seed") return "seed";
  const band = /^specMask\.bands\.(\d+)\.(.+)$/.exec(path);
  if (band) return `bands.${band[1]}.${bandField(band[2]!.split("."))}`;
  const colour = /^specMask\.colour\.(\d+)\.(.+)$/.exec(path);
  if (colour) return `colour.${colour[1]}.${colourField(colour[2]!.split("."))}`;
  if (path === "specMask.bands" || path === "specMask" || path === "specMask.colour") return "bands";
  if (path.startsWith("errorModel.")) {
    const rest = path.slice("errorModel.".length);
    const hit = Object.entries(errorModelFields).find(([k]) => rest === k || rest.startsWith(`${k}.`));
    return hit ? hit[1] : null;
  }
  return null;
}

function toBand(b: BandValues): Record<keyof SpecBand, unknown> {
  const range = b.incidence === "range";
  const cone = b.incidence === "cone";
  return {
    id: b.id.trim(),
    label: b.label.trim() || undefined,
    start: parseNumber(b.start),
    stop: parseNumber(b.stop),
    step: parseNumber(b.step),
    quantity: b.quantity,
    polarization: b.polarization,
    // with an angle range the single angle is not used: it is stored as the range's start
    angleDeg: range ? parseNumber(b.rangeFrom) : parseNumber(b.angleDeg),
    angleRange: range
      ? compact({
          fromDeg: parseNumber(b.rangeFrom),
          toDeg: parseNumber(b.rangeTo),
          stepDeg: parseNumber(b.rangeStep),
        })
      : undefined,
    angleAverage: range && b.angleAverage ? true : undefined,
    cone: cone
      ? b.coneBy === "fNumber"
        ? { fNumber: parseNumber(b.cone) }
        : { halfAngleDeg: parseNumber(b.cone) }
      : undefined,
    requirement: b.requirement,
    value: parseNumber(b.value),
    tolerance: parseNumber(b.tolerance),
  };
}

function pair(lo: string, hi: string): [number | undefined, number | undefined] {
  return [parseNumber(lo), parseNumber(hi)];
}

function toColour(c: ColourValues): Record<keyof SpecColour, unknown> {
  const limit =
    c.limit === "box-xy"
      ? { type: c.limit, x: pair(c.xMin, c.xMax), y: pair(c.yMin, c.yMax) }
      : c.limit === "box-ab"
        ? compact({
            type: c.limit,
            a: pair(c.aMin, c.aMax),
            b: pair(c.bMin, c.bMax),
            L: c.LMin.trim() === "" && c.LMax.trim() === "" ? undefined : pair(c.LMin, c.LMax),
          })
        : {
            type: c.limit,
            formula: c.formula,
            target: { L: parseNumber(c.targetL), a: parseNumber(c.targetA), b: parseNumber(c.targetB) },
            max: parseNumber(c.deltaE),
          };
  return {
    id: c.id.trim(),
    label: c.label.trim() || undefined,
    quantity: c.quantity,
    illuminant: c.illuminant,
    observer: c.observer,
    angleDeg: parseNumber(c.angleDeg),
    polarization: c.polarization,
    limit,
  };
}

function toErrorModel(v: ProgramFormValues): Record<string, unknown> {
  return {
    thickness: {
      relativePct: parseNumber(v.relativePct),
      absoluteNm: parseNumber(v.absoluteNm),
      distribution: v.distribution,
      truncateSigma: parseNumber(v.truncateSigma),
    },
    systematicPct: parsePerMaterial(v.systematicPct),
    indexDriftPct: parsePerMaterial(v.indexDriftPct),
    indexNoisePct: parseNumber(v.indexNoisePct),
  };
}

/** Drops undefined keys so the JSON body carries only what was given. */
function compact<T extends Record<string, unknown>>(o: T): T {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as T;
}

/** The API body for checked form values. The target yield goes from percent to a fraction 0..1. */
export function toProgramBody(v: ProgramFormValues): ProgramBody {
  const pct = parseNumber(v.targetYieldPct) ?? Number.NaN;
  const em = toErrorModel(v);
  return {
    name: v.name.trim(),
    customer: v.customer.trim(),
    description: v.description.trim(),
    application: v.application.trim(),
    protective: v.protective,
    targetYield: Number((pct / 100).toPrecision(12)),
    minEvidenceTrials: parseNumber(v.minEvidenceTrials) ?? Number.NaN,
    confidence: Number(((parseNumber(v.confidencePct) ?? Number.NaN) / 100).toPrecision(12)),
    specMask: {
      bands: v.bands.map((b) => compact(toBand(b)) as unknown as SpecBand),
      // left out when empty, so a mask without colour keeps its stored form (and content hash)
      ...(v.colour.length > 0
        ? { colour: v.colour.map((c) => compact(toColour(c)) as unknown as SpecColour) }
        : {}),
      protective: v.protective,
    },
    errorModel: compact({ ...em, thickness: compact(em.thickness as Record<string, unknown>) }) as ErrorModel,
    studyDefaults: { trials: parseNumber(v.trials) ?? Number.NaN, seed: v.seed.trim() },
  };
}

type Ctx = z.RefinementCtx;

function requireNumber(ctx: Ctx, text: string, path: (string | number)[], opts: { optional?: boolean } = {}) {
  const n = parseNumber(text);
  if (n === undefined && !opts.optional) ctx.addIssue({ code: "custom", path, message: "Enter a number." });
  else if (Number.isNaN(n)) ctx.addIssue({ code: "custom", path, message: "Not a number." });
}

/** Form checks: the texts parse as numbers, and the bands and error model pass the optics package's schemas. */
export const programFormSchema = baseValues.superRefine((v, ctx) => {
  const text = (
    key: "name" | "customer" | "description" | "application" | "seed",
    max: number,
    empty?: string,
  ) => {
    const t = v[key].trim();
    if (empty && t === "") ctx.addIssue({ code: "custom", path: [key], message: empty });
    else if (t.length > max)
      ctx.addIssue({ code: "custom", path: [key], message: `At most ${max} characters.` });
  };
  text("name", 200, "Give the program a name.");
  text("customer", 200);
  text("description", 5000);
  text("application", 200);
  text("seed", 200, "Give a seed.");
  if (v.bands.length === 0 && v.colour.length === 0)
    ctx.addIssue({
      code: "custom",
      path: ["bands"],
      message: "A spec mask needs at least one band or colour requirement.",
    });

  const pct = parseNumber(v.targetYieldPct);
  if (pct === undefined || Number.isNaN(pct) || pct < 0 || pct > 100)
    ctx.addIssue({ code: "custom", path: ["targetYieldPct"], message: "Enter a percentage from 0 to 100." });

  const minTrials = parseNumber(v.minEvidenceTrials);
  if (
    minTrials === undefined ||
    !Number.isInteger(minTrials) ||
    minTrials < MIN_EVIDENCE_TRIALS ||
    minTrials > MAX_TRIALS
  )
    ctx.addIssue({
      code: "custom",
      path: ["minEvidenceTrials"],
      message: `Enter a whole number from ${MIN_EVIDENCE_TRIALS} to ${MAX_TRIALS.toLocaleString("en-GB")}.`,
    });
  const conf = parseNumber(v.confidencePct);
  if (conf === undefined || Number.isNaN(conf) || conf < 50 || conf > 99.9)
    ctx.addIssue({ code: "custom", path: ["confidencePct"], message: "Enter a percentage from 50 to 99.9." });

  const trials = parseNumber(v.trials);
  if (trials === undefined || !Number.isInteger(trials) || trials < 1 || trials > MAX_TRIALS)
    ctx.addIssue({
      code: "custom",
      path: ["trials"],
      message: `Enter a whole number from 1 to ${MAX_TRIALS.toLocaleString("en-GB")}.`,
    });

  // Ids are shared by bands and colour requirements (outcomes, failures and deviations are keyed by them).
  const seen = new Set<string>();
  const checkId = (raw: string, path: (string | number)[], what: string) => {
    const id = raw.trim();
    if (!id) ctx.addIssue({ code: "custom", path: [...path, "id"], message: `Give the ${what} an id.` });
    else if (seen.has(id))
      ctx.addIssue({
        code: "custom",
        path: [...path, "id"],
        message: "Another band or colour requirement has this id.",
      });
    seen.add(id);
    return id;
  };
  const given = (t: string) => {
    const n = parseNumber(t);
    return n !== undefined && !Number.isNaN(n);
  };

  // A number in a range, with a message that says the range; returns false when it added an issue.
  const inRange = (
    text: string,
    path: (string | number)[],
    ok: (n: number) => boolean,
    message: string,
    opts: { optional?: boolean } = {},
  ): boolean => {
    const n = parseNumber(text);
    if (n === undefined) {
      if (opts.optional) return true;
      ctx.addIssue({ code: "custom", path, message: "Enter a number." });
      return false;
    }
    if (Number.isNaN(n)) {
      ctx.addIssue({ code: "custom", path, message: "Not a number." });
      return false;
    }
    if (!ok(n)) {
      ctx.addIssue({ code: "custom", path, message });
      return false;
    }
    return true;
  };
  const angle = (n: number) => n >= 0 && n < 90;
  const ANGLE = "Enter an angle from 0 to below 90°.";

  v.bands.forEach((b, i) => {
    const at = ["bands", i];
    const flagged = new Set<string>();
    const check = (field: keyof BandValues, ok: boolean) => {
      if (!ok) flagged.add(field);
    };
    check(
      "start",
      inRange(b.start, [...at, "start"], (n) => n > 0, "Enter a wavelength above 0 nm."),
    );
    check(
      "stop",
      inRange(b.stop, [...at, "stop"], (n) => n > 0, "Enter a wavelength above 0 nm."),
    );
    check(
      "step",
      inRange(b.step, [...at, "step"], (n) => n > 0, "Enter a step above 0 nm, or leave it empty (1 nm).", {
        optional: true,
      }),
    );
    check(
      "value",
      inRange(b.value, [...at, "value"], () => true, ""),
    );
    check(
      "tolerance",
      inRange(b.tolerance, [...at, "tolerance"], (n) => n >= 0, "Enter a tolerance of 0 or more.", {
        optional: true,
      }),
    );
    if (b.incidence === "range") {
      check("rangeFrom", inRange(b.rangeFrom, [...at, "rangeFrom"], angle, ANGLE));
      check("rangeTo", inRange(b.rangeTo, [...at, "rangeTo"], angle, ANGLE));
      check(
        "rangeStep",
        inRange(
          b.rangeStep,
          [...at, "rangeStep"],
          (n) => n > 0 && n <= 10,
          "Enter an angle step above 0 and at most 10°, or leave it empty (1°).",
          { optional: true },
        ),
      );
    } else {
      check("angleDeg", inRange(b.angleDeg, [...at, "angleDeg"], angle, ANGLE));
    }
    if (b.incidence === "cone")
      check(
        "cone",
        b.coneBy === "fNumber"
          ? inRange(
              b.cone,
              [...at, "cone"],
              (n) => n >= 0.5 && n <= 1000,
              "Enter an f-number from 0.5 to 1000.",
            )
          : inRange(
              b.cone,
              [...at, "cone"],
              (n) => n > 0 && n < 90,
              "Enter a half-angle above 0 and below 90°.",
            ),
      );
    const id = checkId(b.id, at, "band");
    // The optics schema judges what the fields above let through (stand-ins for fields with their own message).
    const usable = (f: keyof BandValues) => given(String(b[f])) && !flagged.has(f);
    const num = (f: keyof BandValues, fallback: string) => (usable(f) ? String(b[f]) : fallback);
    const stop = num("stop", num("start", "1"));
    const candidate: BandValues = {
      ...b,
      id: id || "band",
      start: num("start", stop),
      stop,
      step: num("step", ""),
      angleDeg: num("angleDeg", "0"),
      rangeFrom: num("rangeFrom", "0"),
      rangeTo: num("rangeTo", num("rangeFrom", "0")),
      rangeStep: num("rangeStep", ""),
      cone: num("cone", b.coneBy === "fNumber" ? "2" : "10"),
      value: num("value", "0"),
      tolerance: num("tolerance", ""),
    };
    const parsed = SpecBandSchema.safeParse(compact(toBand(candidate)));
    if (!parsed.success)
      for (const issue of parsed.error.issues) {
        let field = bandField(issue.path as (string | number)[]);
        if (field === "angleDeg" && b.incidence === "range") field = "rangeFrom";
        if (flagged.has(field)) continue;
        flagged.add(field);
        ctx.addIssue({ code: "custom", path: [...at, field], message: issue.message });
      }
  });

  v.colour.forEach((c, i) => {
    const at = ["colour", i];
    const id = checkId(c.id, at, "colour requirement");
    inRange(c.angleDeg, [...at, "angleDeg"], angle, ANGLE);
    const fields: Record<ColourValues["limit"], (keyof ColourValues)[]> = {
      "box-xy": ["xMin", "xMax", "yMin", "yMax"],
      "box-ab": ["aMin", "aMax", "bMin", "bMax"],
      "delta-e": ["targetL", "targetA", "targetB", "deltaE"],
    };
    for (const f of fields[c.limit])
      if (f === "deltaE") inRange(c.deltaE, [...at, f], (n) => n > 0, "Enter a ΔE limit above 0.");
      else requireNumber(ctx, String(c[f]), [...at, f]);
    if (c.limit === "box-ab") {
      const lo = c.LMin.trim() !== "";
      const hi = c.LMax.trim() !== "";
      requireNumber(ctx, c.LMin, [...at, "LMin"], { optional: !hi });
      requireNumber(ctx, c.LMax, [...at, "LMax"], { optional: !lo });
    }
    // Only when every number parsed does the optics schema judge the ranges and limits (one message each).
    const all = [c.angleDeg, ...fields[c.limit].map((f) => String(c[f]))];
    if (c.limit === "box-ab" && (c.LMin.trim() !== "" || c.LMax.trim() !== "")) all.push(c.LMin, c.LMax);
    if (
      !all.every(given) ||
      !angle(parseNumber(c.angleDeg)!) ||
      (c.limit === "delta-e" && !(parseNumber(c.deltaE)! > 0))
    )
      return;
    const parsed = SpecColourSchema.safeParse(compact(toColour({ ...c, id: id || "colour" })));
    if (!parsed.success)
      for (const issue of parsed.error.issues) {
        const field = colourField(issue.path as (string | number)[]);
        // a reversed range is shown at its upper end, in the form's words
        const message = /min ≤ max/.test(issue.message)
          ? "The upper end must not be below the lower end."
          : issue.message;
        ctx.addIssue({
          code: "custom",
          path: [...at, field.endsWith("Min") ? field.replace(/Min$/, "Max") : field],
          message,
        });
      }
  });

  const numeric: Array<keyof ProgramFormValues> = ["relativePct", "absoluteNm"];
  for (const k of numeric) requireNumber(ctx, String(v[k]), [k]);
  requireNumber(ctx, v.truncateSigma, ["truncateSigma"], { optional: true });
  requireNumber(ctx, v.indexNoisePct, ["indexNoisePct"], { optional: true });
  for (const k of ["systematicPct", "indexDriftPct"] as const)
    if (Number.isNaN(parsePerMaterial(v[k])))
      ctx.addIssue({
        code: "custom",
        path: [k],
        message: "Enter a number, or per material like “Ta2O5 = 0.5, SiO2 = 0.4”.",
      });
  const em = toErrorModel(v);
  const thickness = em.thickness as Record<string, unknown>;
  const unparsed = [...Object.values(thickness), em.systematicPct, em.indexDriftPct, em.indexNoisePct].some(
    (x) => typeof x === "number" && Number.isNaN(x),
  );
  if (unparsed || thickness.relativePct === undefined || thickness.absoluteNm === undefined) return;
  const parsedEm = ErrorModelSchema.safeParse(
    compact({ ...em, thickness: compact(em.thickness as Record<string, unknown>) }),
  );
  if (!parsedEm.success)
    for (const issue of parsedEm.error.issues) {
      const field = fieldForPath(`errorModel.${issue.path.join(".")}`);
      if (field) ctx.addIssue({ code: "custom", path: [field], message: issue.message });
    }
});
