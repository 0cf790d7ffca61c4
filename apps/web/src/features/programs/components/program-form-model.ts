// The program form's values (text as typed), their checks and the conversion to the API body.
import { z } from "zod";
import { ErrorModelSchema, MAX_TRIALS, SpecBandSchema } from "@stackproof/optics";
import type { ErrorModel, SpecBand } from "@stackproof/optics";
import type { Program } from "../api/get-program.ts";
import type { ProgramBody } from "../api/save-program.ts";

const quantities = ["R", "T", "A", "OD"] as const;
const polarizations = ["s", "p", "u", "sp"] as const;
const requirements = ["min", "max", "avgMin", "avgMax"] as const;

const bandValues = z.object({
  id: z.string(),
  label: z.string(),
  start: z.string(),
  stop: z.string(),
  quantity: z.enum(quantities),
  polarization: z.enum(polarizations),
  angleDeg: z.string(),
  requirement: z.enum(requirements),
  value: z.string(),
  tolerance: z.string(),
  /** angle range, cone, angle average and step of a stored band, carried through unchanged (JSON) */
  conditions: z.string().optional(),
});
export type BandValues = z.infer<typeof bandValues>;

// Only the shape here: every check is in the refinement below, so all of them run on every submit
// (zod skips an object's refinements once one of its fields has failed).
const baseValues = z.object({
  name: z.string(),
  customer: z.string(),
  description: z.string(),
  application: z.string(),
  protective: z.boolean(),
  targetYieldPct: z.string(),
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
    quantity: "R",
    polarization: "u",
    angleDeg: "0",
    requirement: "max",
    value: "",
    tolerance: "",
  };
}

export function defaultFormValues(): ProgramFormValues {
  return {
    name: "",
    customer: "",
    description: "",
    application: "",
    protective: false,
    targetYieldPct: "90",
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
    trials: String(p.studyDefaults.trials),
    seed: p.studyDefaults.seed,
    relativePct: str(t.relativePct ?? 0),
    absoluteNm: str(t.absoluteNm ?? 0),
    distribution: t.distribution ?? "normal",
    truncateSigma: str(t.truncateSigma),
    systematicPct: formatPerMaterial(p.errorModel.systematicPct),
    indexDriftPct: formatPerMaterial(p.errorModel.indexDriftPct),
    indexNoisePct: str(p.errorModel.indexNoisePct),
    bands: p.specMask.bands.map((b) => ({
      id: b.id,
      label: b.label ?? "",
      start: String(b.start),
      stop: String(b.stop),
      quantity: b.quantity,
      polarization: b.polarization,
      angleDeg: String(b.angleDeg),
      requirement: b.requirement,
      value: String(b.value),
      tolerance: str(b.tolerance),
      conditions: JSON.stringify({ step: b.step, angleRange: b.angleRange, angleAverage: b.angleAverage, cone: b.cone }),
    })),
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

/**
 * The form field a server (or optics schema) issue path belongs to, e.g. "specMask.bands.2.stop" →
 * "bands.2.stop", "targetYield" → "targetYieldPct"; null when no field shows it.
 */
export function fieldForPath(path: string): string | null {
  const direct = ["name", "customer", "description", "application", "protective"];
  if (direct.includes(path)) return path;
  if (path === "targetYield") return "targetYieldPct";
  if (path === "studyDefaults.trials") return "trials";
  if (path === "studyDefaults.seed") return "seed";
  const band = /^specMask\.bands\.(\d+)\.(\w+)/.exec(path);
  if (band) {
    const key = band[2] === "step" ? "stop" : band[2];
    return `bands.${band[1]}.${key}`;
  }
  if (path === "specMask.bands" || path === "specMask") return "bands";
  if (path.startsWith("errorModel.")) {
    const rest = path.slice("errorModel.".length);
    const hit = Object.entries(errorModelFields).find(([k]) => rest === k || rest.startsWith(`${k}.`));
    return hit ? hit[1] : null;
  }
  return null;
}

function toBand(b: BandValues): Record<keyof SpecBand, unknown> {
  const kept = (b.conditions ? JSON.parse(b.conditions) : {}) as Partial<SpecBand>;
  return {
    angleRange: kept.angleRange,
    angleAverage: kept.angleAverage,
    cone: kept.cone,
    id: b.id.trim(),
    label: b.label.trim() || undefined,
    start: parseNumber(b.start),
    stop: parseNumber(b.stop),
    step: kept.step,
    quantity: b.quantity,
    polarization: b.polarization,
    angleDeg: parseNumber(b.angleDeg),
    requirement: b.requirement,
    value: parseNumber(b.value),
    tolerance: parseNumber(b.tolerance),
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
    specMask: {
      bands: v.bands.map((b) => compact(toBand(b)) as unknown as SpecBand),
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
  if (v.bands.length === 0)
    ctx.addIssue({ code: "custom", path: ["bands"], message: "A spec mask needs at least one band." });

  const pct = parseNumber(v.targetYieldPct);
  if (pct === undefined || Number.isNaN(pct) || pct < 0 || pct > 100)
    ctx.addIssue({ code: "custom", path: ["targetYieldPct"], message: "Enter a percentage from 0 to 100." });

  const trials = parseNumber(v.trials);
  if (trials === undefined || !Number.isInteger(trials) || trials < 1 || trials > MAX_TRIALS)
    ctx.addIssue({
      code: "custom",
      path: ["trials"],
      message: `Enter a whole number from 1 to ${MAX_TRIALS.toLocaleString("en-GB")}.`,
    });

  const seen = new Map<string, number>();
  v.bands.forEach((b, i) => {
    requireNumber(ctx, b.start, ["bands", i, "start"]);
    requireNumber(ctx, b.stop, ["bands", i, "stop"]);
    requireNumber(ctx, b.angleDeg, ["bands", i, "angleDeg"]);
    requireNumber(ctx, b.value, ["bands", i, "value"]);
    requireNumber(ctx, b.tolerance, ["bands", i, "tolerance"], { optional: true });
    const id = b.id.trim();
    if (!id) ctx.addIssue({ code: "custom", path: ["bands", i, "id"], message: "Give the band an id." });
    else if (seen.has(id))
      ctx.addIssue({ code: "custom", path: ["bands", i, "id"], message: "Another band has this id." });
    seen.set(id, i);
    // The optics schema sees the numbers that parsed (stand-ins for the rest, whose own message is above).
    const given = (t: string) => {
      const n = parseNumber(t);
      return n !== undefined && !Number.isNaN(n);
    };
    const num = (t: string, fallback: number | undefined) => (given(t) ? parseNumber(t) : fallback);
    const stop = num(b.stop, undefined);
    const start = num(b.start, stop ?? 1);
    const parsed = SpecBandSchema.safeParse(
      compact({
        ...toBand(b),
        id: id || "band",
        start,
        stop: stop ?? start,
        angleDeg: num(b.angleDeg, 0),
        value: num(b.value, 0),
        tolerance: num(b.tolerance, undefined),
      }),
    );
    const numeric: Record<string, string> = {
      start: b.start,
      stop: b.stop,
      angleDeg: b.angleDeg,
      value: b.value,
      tolerance: b.tolerance,
    };
    if (!parsed.success)
      for (const issue of parsed.error.issues) {
        const key = String(issue.path[0] ?? "id");
        const field = key === "step" ? "stop" : key;
        const typed = numeric[field];
        if (typed !== undefined && !given(typed)) continue;
        ctx.addIssue({ code: "custom", path: ["bands", i, field], message: issue.message });
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
