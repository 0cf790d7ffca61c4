/**
 * Process model: how the chamber controls each layer ("stackproof.process", version 1). It sits inside
 * an error model (`errorModel.process`); see docs/studies.md for the format and README.md for the
 * physics of each control method. All spreads are 1σ; percentages are of the layer's thickness (or of
 * the photometer signal for optical monitoring).
 *
 * This module holds only schemas and plain-language wording; it must not import error-model.ts (which
 * imports it).
 */
import { z } from "zod";

const pct = z.number().min(0).max(50);

/**
 * Time / rate control: the layer stops after the time computed from the nominal rate.
 * - rateErrorPct: rate calibration error per material per run (same for every layer of that material).
 * - rateDriftPct, driftCorrelation: slow rate drift per material source, a stationary first-order
 *   autoregressive process x_j = ρ x_{j−1} + √(1 − ρ²) σ z_j stepped once per deposited layer
 *   (ρ = driftCorrelation, σ = rateDriftPct / 100), so the rate of consecutive layers is correlated.
 * - withinLayerPct: the layer-average of fast rate fluctuations inside one layer (independent per layer).
 * - indexDriftPct: index drift per material, the same autoregressive process (same ρ) on the whole N.
 * - shutterNm: shutter timing error per layer, nm.
 */
export const TimeControlSchema = z.object({
  method: z.literal("time"),
  rateErrorPct: pct.default(0),
  rateDriftPct: pct.default(0),
  driftCorrelation: z.number().min(0).max(0.9999).default(0.9),
  withinLayerPct: pct.default(0),
  indexDriftPct: pct.default(0),
  shutterNm: z.number().min(0).max(100).default(0),
});

/**
 * Quartz-crystal control: the crystal's thickness reading, scaled by the material's tooling factor.
 * - toolingPct: tooling-factor error per material per run (every layer of the material, one draw per run).
 * - noisePct: crystal noise per layer (relative, independent per layer).
 * - terminationNm: termination error per layer, nm.
 */
export const CrystalControlSchema = z.object({
  method: z.literal("crystal"),
  toolingPct: pct.default(0),
  noisePct: pct.default(0),
  terminationNm: z.number().min(0).max(100).default(0),
});

/**
 * Optical monitoring: a photometer watches the signal of the part (or a witness chip) at the layer's
 * monitoring wavelength while the layer grows on the stack as actually built; the layer stops where the
 * noisy criterion of the monitoring plan fires.
 * - signal: "T" or "R" of the monitored chip at normal incidence (front surface only).
 * - noisePct: photometric noise, σ in % of the signal.
 * - detectionPct: turning-point detection threshold, % of the signal at the extremum: the cut happens
 *   when the noisy signal has retreated this far from the extremum. Default 3 × noisePct.
 * - driftPct: photometer gain drift, σ in % per layer, a random walk from the start of the run.
 * - overshootNm, overshootSigmaNm: termination overshoot (shutter delay × rate), mean and σ, nm.
 */
export const OpticalControlSchema = z.object({
  method: z.literal("optical"),
  signal: z.enum(["T", "R"]).default("T"),
  noisePct: pct.default(0),
  detectionPct: pct.optional(),
  driftPct: pct.default(0),
  overshootNm: z.number().min(-100).max(100).default(0),
  overshootSigmaNm: z.number().min(0).max(100).default(0),
});

/** One control method with its parameters, discriminated on `method`. */
export const ControlSchema = z.discriminatedUnion("method", [
  TimeControlSchema,
  CrystalControlSchema,
  OpticalControlSchema,
]);
export type Control = z.output<typeof ControlSchema>;
export type TimeControl = z.output<typeof TimeControlSchema>;
export type CrystalControl = z.output<typeof CrystalControlSchema>;
export type OpticalControl = z.output<typeof OpticalControlSchema>;

/**
 * Monitoring of one layer (used only for layers whose material is under optical control):
 * wavelength (nm, vacuum), where (the part itself or the witness chip in place) and the cut criterion
 * ("turning": stop at the turning point the nominal layer ends on; "level": stop where the signal
 * reaches the trigger value, the nominal stack's signal at the nominal thickness).
 */
export const MonitoringStepSchema = z.object({
  wavelength: z.number().positive().max(100000),
  on: z.enum(["part", "witness"]).default("part"),
  criterion: z.enum(["turning", "level"]),
});
export type MonitoringStep = z.output<typeof MonitoringStepSchema>;

/**
 * Chamber uniformity: the thickness at radius r (mm) is proportional to 1 + a·r² (a in 1/mm²). The
 * process is calibrated (crystal tooling, or the monitored chip/part) at `referenceRadiusMm`; the part
 * sits at `radiusMm`, a fixed radius or a range [min, max] over which parts are spread uniformly by
 * plate area (one position drawn per trial: the yield is then the yield across the plate).
 */
export const UniformitySchema = z.object({
  a: z.number().min(-1).max(1),
  radiusMm: z.union([
    z.number().min(0).max(5000),
    z
      .object({ min: z.number().min(0).max(5000), max: z.number().min(0).max(5000) })
      .refine((r) => r.max >= r.min, { error: "expected max ≥ min", path: ["max"] }),
  ]),
  referenceRadiusMm: z.number().min(0).max(5000).default(0),
});
export type Uniformity = z.output<typeof UniformitySchema>;

/** Process format version written in every process model. */
export const PROCESS_VERSION = 1;

/**
 * A process model (version 1).
 * - control: one control for every material, or a record naming each material of the design.
 * - plan: per layer (deposition order) the monitoring step; required length = number of layers when
 *   given; when absent and a material is optically monitored, {@link defaultMonitoringPlan} is used.
 * - witness: witness chip changed every `everyLayers` layers (the chip in place receives every layer
 *   deposited while it is in), on `substrate` (a material id; default the design's substrate).
 * - uniformity: radial thickness profile and the part's position.
 */
export const ProcessModelSchema = z.object({
  version: z.literal(PROCESS_VERSION).default(PROCESS_VERSION),
  label: z.string().max(200).optional(),
  control: z.union([ControlSchema, z.record(z.string(), ControlSchema)]),
  plan: z.array(MonitoringStepSchema).max(10000).optional(),
  witness: z
    .object({
      everyLayers: z.number().int().min(1).max(10000),
      substrate: z.string().min(1).optional(),
    })
    .optional(),
  uniformity: UniformitySchema.optional(),
});
export type ProcessModel = z.output<typeof ProcessModelSchema>;
export type ProcessModelInput = z.input<typeof ProcessModelSchema>;

const fmt = (v: number): string => String(Number(v.toPrecision(3)));

function describeControl(c: Control, plan: readonly MonitoringStep[] | undefined): string {
  if (c.method === "time") {
    const parts = [`rate error ${fmt(c.rateErrorPct)} %`];
    if (c.rateDriftPct > 0)
      parts.push(`rate drift ${fmt(c.rateDriftPct)} % (layer-to-layer correlation ${fmt(c.driftCorrelation)})`);
    if (c.withinLayerPct > 0) parts.push(`${fmt(c.withinLayerPct)} % within-layer fluctuation`);
    if (c.indexDriftPct > 0) parts.push(`index drift ${fmt(c.indexDriftPct)} %`);
    if (c.shutterNm > 0) parts.push(`${fmt(c.shutterNm)} nm shutter error`);
    return `time control, ${parts.join(", ")}`;
  }
  if (c.method === "crystal") {
    const parts = [`tooling error ${fmt(c.toolingPct)} %`];
    if (c.noisePct > 0) parts.push(`crystal noise ${fmt(c.noisePct)} %`);
    if (c.terminationNm > 0) parts.push(`${fmt(c.terminationNm)} nm termination error`);
    return `quartz-crystal control, ${parts.join(", ")}`;
  }
  const parts: string[] = [];
  if (plan && plan.length > 0) {
    const groups = new Map<string, number>();
    for (const s of plan) {
      const key = `${s.criterion === "turning" ? "turning points" : "levels"} at ${fmt(s.wavelength)} nm on the ${s.on === "part" ? "part" : "witness chip"}`;
      groups.set(key, (groups.get(key) ?? 0) + 1);
    }
    const sorted = [...groups.entries()].sort((a, b) => b[1] - a[1]);
    parts.push(
      sorted.length === 1
        ? (sorted[0] as [string, number])[0]
        : sorted.map(([k, n]) => `${k} (${n} layer${n === 1 ? "" : "s"})`).join("; "),
    );
  } else parts.push("monitoring plan from the design");
  parts.push(`${fmt(c.noisePct)} % photometric noise`);
  if (c.detectionPct !== undefined && (!plan || plan.some((s) => s.criterion === "turning")))
    parts.push(`turning points detected ${fmt(c.detectionPct)} % past the extremum`);
  if (c.driftPct > 0) parts.push(`${fmt(c.driftPct)} % signal drift per layer`);
  if (c.overshootNm !== 0 || c.overshootSigmaNm > 0)
    parts.push(`overshoot ${fmt(c.overshootNm)} ± ${fmt(c.overshootSigmaNm)} nm`);
  return `optical monitoring (${c.signal}), ${parts.join(", ")}`;
}

/**
 * The process in plain words for a release record, e.g. "optical monitoring (T), turning points at
 * 905 nm on the part, 0.5 % photometric noise". Accepts a process model or an error model (an error
 * model without a process is worded as independent errors).
 */
export function describeProcess(model: ProcessModelInput | ErrorModelLike): string {
  if ("thickness" in model && !("control" in model)) {
    const m = model as ErrorModelLike;
    if (m.process) return describeProcess(m.process) + indexSuffix(m);
    const t = m.thickness;
    const parts = [
      `independent thickness errors ${fmt(t.relativePct)} % + ${fmt(t.absoluteNm)} nm per layer (${t.distribution})`,
    ];
    if (m.systematicPct !== undefined) parts.push(`per-material scale ${describePerMaterial(m.systematicPct)}`);
    return parts.join(", ") + indexSuffix(m);
  }
  const p = ProcessModelSchema.parse(model);
  const plan = p.plan;
  let text: string;
  if ("method" in p.control) text = describeControl(p.control as Control, plan);
  else {
    const entries = Object.entries(p.control as Record<string, Control>).sort(([a], [b]) => a.localeCompare(b));
    const byText = new Map<string, string[]>();
    for (const [m, c] of entries) {
      const d = describeControl(c, plan);
      byText.set(d, [...(byText.get(d) ?? []), m]);
    }
    text =
      byText.size === 1
        ? [...byText.keys()][0] as string
        : [...byText.entries()].map(([d, ms]) => `${ms.join(", ")}: ${d}`).join("; ");
  }
  if (p.witness) text += `; witness chip changed every ${p.witness.everyLayers} layers`;
  if (p.uniformity) {
    const u = p.uniformity;
    const r = typeof u.radiusMm === "number" ? `${fmt(u.radiusMm)} mm` : `${fmt(u.radiusMm.min)}–${fmt(u.radiusMm.max)} mm`;
    text += `; uniformity 1 + ${u.a.toExponential(2)}·r² (r in mm), part at ${r}, calibrated at ${fmt(u.referenceRadiusMm)} mm`;
  }
  return text;
}

/** The fields of an error model that {@link describeProcess} reads (kept structural to avoid an import cycle). */
export interface ErrorModelLike {
  thickness: { relativePct: number; absoluteNm: number; distribution: string };
  systematicPct?: number | Record<string, number> | undefined;
  indexDriftPct?: number | Record<string, number> | undefined;
  indexNoisePct?: number | undefined;
  process?: ProcessModelInput | undefined;
}

function describePerMaterial(v: number | Record<string, number>): string {
  if (typeof v === "number") return `${fmt(v)} %`;
  return Object.entries(v)
    .sort(([a], [b]) => a.localeCompare(b))
    .map(([k, x]) => `${k} ${fmt(x)} %`)
    .join(", ");
}

function indexSuffix(m: ErrorModelLike): string {
  const parts: string[] = [];
  if (m.indexDriftPct !== undefined) parts.push(`index drift ${describePerMaterial(m.indexDriftPct)} per run`);
  if (m.indexNoisePct) parts.push(`index noise ${fmt(m.indexNoisePct)} % per layer`);
  return parts.length ? `; ${parts.join(", ")}` : "";
}

function scaleControl(c: Control, s: number): Control {
  if (c.method === "time")
    return {
      ...c,
      rateErrorPct: c.rateErrorPct * s,
      rateDriftPct: c.rateDriftPct * s,
      withinLayerPct: c.withinLayerPct * s,
      indexDriftPct: c.indexDriftPct * s,
      shutterNm: c.shutterNm * s,
    };
  if (c.method === "crystal")
    return { ...c, toolingPct: c.toolingPct * s, noisePct: c.noisePct * s, terminationNm: c.terminationNm * s };
  const out: OpticalControl = {
    ...c,
    noisePct: c.noisePct * s,
    driftPct: c.driftPct * s,
    overshootNm: c.overshootNm * s,
    overshootSigmaNm: c.overshootSigmaNm * s,
  };
  if (c.detectionPct !== undefined) out.detectionPct = c.detectionPct * s;
  return out;
}

/**
 * Multiply every spread of a process model by `scale` (rate, tooling, noise, drift, termination and
 * overshoot; the detection threshold with the noise). Uniformity is a chamber property and stays.
 */
export function scaleProcessModel(input: ProcessModelInput, scale: number): ProcessModel {
  const p = ProcessModelSchema.parse(input);
  const control =
    "method" in p.control
      ? scaleControl(p.control as Control, scale)
      : Object.fromEntries(
          Object.entries(p.control as Record<string, Control>).map(([k, c]) => [k, scaleControl(c, scale)]),
        );
  return { ...p, control };
}
