// Editor state of the process comparison: candidate processes (per material a control method and its
// parameters) and one monitoring plan per layer shared by the optically monitored candidates.
// Pure data shaping; the defaults of the plan come from the optics package (defaultMonitoringPlan).
import { defaultMonitoringPlan } from "@stackproof/optics";
import type { Control, Design, ErrorModel, MonitoringStep, ProcessModelInput } from "@stackproof/optics";

export type Method = Control["method"];

/** One candidate of the comparison: the study's independent-error model, or a process. */
export interface Candidate {
  id: string;
  label: string;
  independent: boolean;
  /** control per material id (process candidates only) */
  controls: Record<string, Control>;
  /** chamber uniformity 1 + a·r² (a in 1/mm²; 0 = uniform) and the plate radii the parts are spread over (mm) */
  plate: { a: number; minMm: number; maxMm: number };
}

export interface PlanState {
  steps: MonitoringStep[];
  /** witness chip changed every N layers (used when a step is on the witness) */
  witnessEvery: number;
}

/** Parameters of each method, for the editor: key, label, unit, step. */
export const METHOD_FIELDS: Record<Method, { key: string; label: string; unit: string; step: number }[]> = {
  time: [
    { key: "rateErrorPct", label: "Rate error per run", unit: "%", step: 0.1 },
    { key: "rateDriftPct", label: "Rate drift", unit: "%", step: 0.1 },
    { key: "driftCorrelation", label: "Drift correlation layer to layer", unit: "ρ", step: 0.05 },
    { key: "withinLayerPct", label: "Within-layer fluctuation", unit: "%", step: 0.1 },
    { key: "indexDriftPct", label: "Index drift", unit: "%", step: 0.1 },
    { key: "shutterNm", label: "Shutter error", unit: "nm", step: 0.1 },
  ],
  crystal: [
    { key: "toolingPct", label: "Tooling-factor error per run", unit: "%", step: 0.1 },
    { key: "noisePct", label: "Crystal noise per layer", unit: "%", step: 0.1 },
    { key: "terminationNm", label: "Termination error", unit: "nm", step: 0.1 },
  ],
  optical: [
    { key: "noisePct", label: "Photometric noise", unit: "% of signal", step: 0.1 },
    { key: "detectionPct", label: "Turning-point detection threshold", unit: "% of signal", step: 0.1 },
    { key: "driftPct", label: "Signal drift per layer", unit: "%", step: 0.05 },
    { key: "overshootNm", label: "Overshoot, mean", unit: "nm", step: 0.1 },
    { key: "overshootSigmaNm", label: "Overshoot, σ", unit: "nm", step: 0.1 },
  ],
};

export const METHOD_LABELS: Record<Method, string> = {
  time: "Time / rate",
  crystal: "Quartz crystal",
  optical: "Optical monitoring",
};

/** Typical starting values of each method (1σ; common practice, no source). */
export function defaultControl(method: Method): Control {
  if (method === "time")
    return { method, rateErrorPct: 1, rateDriftPct: 0.5, driftCorrelation: 0.8, withinLayerPct: 0.3, indexDriftPct: 0, shutterNm: 0.3 };
  if (method === "crystal") return { method, toolingPct: 0.5, noisePct: 0.5, terminationNm: 0.3 };
  // detection threshold three times the noise: the engine's own default, written out so the editor shows it
  return { method, signal: "T", noisePct: 0.3, detectionPct: 0.9, driftPct: 0, overshootNm: 0, overshootSigmaNm: 0.3 };
}

export function materialsOf(design: Design): string[] {
  return [...new Set(design.layers.map((l) => l.material))].sort();
}

let counter = 0;
const nextId = () => `c${++counter}`;

/** A process candidate with the same method for every material. */
export function uniformCandidate(design: Design, method: Method, label: string): Candidate {
  return { id: nextId(), label, independent: false, controls: Object.fromEntries(materialsOf(design).map((m) => [m, defaultControl(method)])), plate: { a: 0, minMm: 0, maxMm: 0 } };
}

/** The starting comparison: independent errors, quartz crystal, optical monitoring. */
export function defaultCandidates(design: Design): Candidate[] {
  return [
    { id: nextId(), label: "Independent errors (program model)", independent: true, controls: {}, plate: { a: 0, minMm: 0, maxMm: 0 } },
    uniformCandidate(design, "crystal", "Quartz crystal"),
    uniformCandidate(design, "optical", "Optical monitoring"),
  ];
}

/** The default plan of the design (optics: turning points at λ0 where the layer ends on one, levels elsewhere). */
export function defaultPlan(design: Design): PlanState {
  try {
    return { steps: defaultMonitoringPlan(design), witnessEvery: 4 };
  } catch {
    return { steps: design.layers.map(() => ({ wavelength: design.referenceWavelength, on: "part", criterion: "level" })), witnessEvery: 4 };
  }
}

/** The process model of a candidate (null for the independent-error candidate). */
export function toProcess(c: Candidate, plan: PlanState, design: Design): ProcessModelInput | null {
  if (c.independent) return null;
  const controls = materialsOf(design).map((m) => [m, c.controls[m] ?? defaultControl("crystal")] as const);
  const optical = controls.some(([, x]) => x.method === "optical");
  const steps = plan.steps.length === design.layers.length ? plan.steps : defaultPlan(design).steps;
  const witness = optical && steps.some((s, j) => s.on === "witness" && c.controls[design.layers[j]?.material ?? ""]?.method === "optical");
  return {
    version: 1,
    label: c.label,
    control: Object.fromEntries(controls),
    ...(optical ? { plan: steps } : {}),
    ...(witness ? { witness: { everyLayers: Math.max(1, Math.round(plan.witnessEvery)) } } : {}),
    ...(c.plate.a !== 0
      ? {
          uniformity: {
            a: c.plate.a,
            radiusMm: { min: Math.max(0, Math.min(c.plate.minMm, c.plate.maxMm)), max: Math.max(0, c.plate.minMm, c.plate.maxMm) },
            referenceRadiusMm: 0,
          },
        }
      : {}),
  };
}

/** True when some material of the error model's process is under optical monitoring. */
export function usesOptical(model: ErrorModel): boolean {
  const c = model.process?.control;
  if (!c) return false;
  if ("method" in c) return (c as Control).method === "optical";
  return Object.values(c as Record<string, Control>).some((x) => x.method === "optical");
}
