// A release record read back from its stored snapshot, with every field the page and the PDF show given a safe
// default. Snapshots are stored as taken at release: older ones lack the evidence, deviation and plot sections, and a
// value that was not finite was stored as null. Reading never throws, so every stored release renders.
import {
  bandConditionsText,
  describeColourIso,
  describeProcess,
  type ErrorModel,
  type SpecBand,
  type SpecColourInput,
} from "@stackproof/optics";
import type { ReleaseSnapshot } from "./workflow.ts";

export interface RecordBand {
  id: string;
  label: string;
  start: number;
  stop: number;
  quantity: string;
  polarization: string;
  angleDeg: number;
  /** The band's conditions in words (as a plot series states them), or null when the stored band cannot say. */
  conditions: string | null;
  requirement: string;
  value: number | null;
  tolerance: number | null;
  nominalMargin: number | null;
  nominalPass: boolean | null;
  failures: number | null;
}

/** A colour requirement of the released mask, in ISO 9211 style words, with its nominal result. */
export interface RecordColour {
  id: string;
  label: string;
  /** e.g. "Colour of reflected light: CIE 1931 standard colorimetric observer (2°), CIE illuminant D65; …" */
  wording: string;
  /** the colour found, e.g. "L* 4.21, a* 2.10, b* −1.20" (empty when not recorded) */
  found: string;
  nominalMargin: number | null;
  nominalPass: boolean | null;
  failures: number | null;
}

export interface RecordPlot {
  quantity: string;
  polarization: string;
  angleDeg: number;
  /** The series' conditions in words (null on releases filed before they were stored). */
  conditions: string | null;
  wavelengths: number[];
  nominal: (number | null)[];
  low: (number | null)[] | null;
  high: (number | null)[] | null;
  lowP: number | null;
  highP: number | null;
  bands: RecordBand[];
}

export interface ReleaseRecord {
  id: string;
  status: string;
  releasedAt: string;
  releasedBy: string;
  workspace: string;
  program: {
    name: string;
    customer: string;
    application: string;
    protective: boolean;
    targetYield: number | null;
    version: number | null;
    minEvidenceTrials: number | null;
    confidence: number | null;
  };
  design: string;
  revision: {
    number: number | null;
    hash: string;
    note: string;
    author: string;
    createdAt: string;
    layers: { material: string; thickness: number | null; locked: boolean }[];
    stackLine: string;
  };
  bands: RecordBand[];
  /** colour requirements (masks without them: []) */
  colour: RecordColour[];
  run: {
    id: string;
    trials: number | null;
    seed: string;
    /** The error model as stored (JSON). */
    errorModel: string;
    /** The error model in plain words: the process model when present, else the independent errors. */
    errorModelText: string;
    engineVersion: string;
    yield: number | null;
    passCount: number | null;
    low95: number | null;
    high95: number | null;
    clientVerified: boolean;
  } | null;
  evidence: {
    kind: string;
    programVersion: number | null;
    seedRule: string;
    lowerBound: number | null;
    confidence: number | null;
    minTrials: number | null;
    targetYield: number | null;
    pass: boolean | null;
  } | null;
  deviation: {
    required: boolean;
    bands: { id: string; change: string }[];
    status: string | null;
    reason: string;
    requestedBy: string;
    requestedAt: string;
    decidedBy: string;
    decidedAt: string;
    decisionNote: string;
  };
  plots: RecordPlot[];
  decisions: { at: string; action: string; actor: string; note: string; programVersion: number | null }[];
  threads: { total: number; open: number; resolved: number };
  caution: string | null;
}

const obj = (v: unknown): Record<string, unknown> =>
  v !== null && typeof v === "object" && !Array.isArray(v) ? (v as Record<string, unknown>) : {};
const arr = (v: unknown): unknown[] => (Array.isArray(v) ? v : []);
const str = (v: unknown, d = ""): string =>
  typeof v === "string" ? v : typeof v === "number" ? String(v) : d;
const num = (v: unknown): number | null => (typeof v === "number" && Number.isFinite(v) ? v : null);
const bool = (v: unknown): boolean => v === true;
const name = (v: unknown): string => str(obj(v).name, "");
const nums = (v: unknown): (number | null)[] => arr(v).map(num);

/**
 * An error model in plain words (optics' describeProcess), e.g. "optical monitoring (T), turning points at 905 nm
 * on the part, 0.05 % photometric noise"; a stored model it cannot read is said to be so (never throws).
 */
export function describeErrorModel(model: unknown): string {
  try {
    if (model === null || typeof model !== "object") return "not recorded";
    return describeProcess(model as ErrorModel);
  } catch {
    return "not readable (see the stored error model)";
  }
}

/** The record of a stored snapshot (any shape) with the revision's current status. */
export function readReleaseRecord(snapshot: ReleaseSnapshot | unknown, status: string): ReleaseRecord {
  const s = obj(snapshot);
  const program = obj(s.program);
  const revision = obj(s.revision);
  const stack = obj(revision.stack);
  const substrate = obj(stack.substrate);
  const mask = obj(revision.specMask);
  const nominal = new Map(arr(obj(s.nominal).bands).map((b) => [str(obj(b).id), obj(b)] as const));
  const run = s.yieldRun ? obj(s.yieldRun) : null;
  const failures = new Map(arr(run?.bandFailures).map((b) => [str(obj(b).id), num(obj(b).count)] as const));
  const bands: RecordBand[] = arr(mask.bands).map((raw) => {
    const b = obj(raw);
    const id = str(b.id, "?");
    const o = nominal.get(id);
    return {
      id,
      label: str(b.label),
      start: num(b.start) ?? 0,
      stop: num(b.stop) ?? 0,
      quantity: str(b.quantity, "?"),
      polarization: str(b.polarization, "?"),
      angleDeg: num(b.angleDeg) ?? 0,
      conditions: (() => {
        try {
          return bandConditionsText(b as unknown as SpecBand);
        } catch {
          return null;
        }
      })(),
      requirement: str(b.requirement, "?"),
      value: num(b.value),
      tolerance: num(b.tolerance),
      nominalMargin: o ? num(o.margin) : null,
      nominalPass: o ? (typeof o.pass === "boolean" ? o.pass : null) : null,
      failures: run ? (failures.get(id) ?? 0) : null,
    };
  });
  const colour: RecordColour[] = arr(mask.colour).map((raw) => {
    const c = obj(raw);
    const id = str(c.id, "?");
    const o = nominal.get(id);
    const found = obj(o?.colour);
    const f2 = (v: unknown) => (num(v) === null ? "—" : (num(v) as number).toFixed(2).replace(/^-/, "−"));
    let wording: string;
    try {
      wording = describeColourIso(raw as SpecColourInput);
    } catch {
      wording = "colour requirement (not readable)";
    }
    return {
      id,
      label: str(c.label),
      wording,
      found: o?.colour
        ? `L* ${f2(found.L)}, a* ${f2(found.a)}, b* ${f2(found.b)}; x ${num(found.x)?.toFixed(4) ?? "—"}, y ${num(found.y)?.toFixed(4) ?? "—"}`
        : "",
      nominalMargin: o ? num(o.margin) : null,
      nominalPass: o ? (typeof o.pass === "boolean" ? o.pass : null) : null,
      failures: run ? (failures.get(id) ?? 0) : null,
    };
  });
  const evidence = s.evidence ? obj(s.evidence) : null;
  const figures = obj(evidence?.figures);
  const interval = obj(run?.interval);
  const dev = obj(s.deviation);
  const current = dev.current ? obj(dev.current) : null;
  const plots: RecordPlot[] = arr(s.plot).map((raw) => {
    const p = obj(raw);
    const quantity = str(p.quantity, "?");
    const polarization = str(p.polarization, "?");
    const angleDeg = num(p.angleDeg) ?? 0;
    const conditions = typeof p.conditions === "string" ? p.conditions : null;
    const wavelengths = nums(p.wavelengths).map((x) => x ?? NaN);
    return {
      quantity,
      polarization,
      angleDeg,
      conditions,
      wavelengths,
      nominal: nums(p.nominal),
      low: p.low ? nums(p.low) : null,
      high: p.high ? nums(p.high) : null,
      lowP: num(p.lowP),
      highP: num(p.highP),
      // A series shows the limits of the bands evaluated under its conditions (a band with a cone, an angle range
      // or "s and p each" has a series of its own) that it has samples of.
      bands: bands.filter(
        (b) =>
          b.quantity === quantity &&
          (conditions !== null && b.conditions !== null
            ? b.conditions === conditions
            : b.polarization === polarization && b.angleDeg === angleDeg) &&
          wavelengths.some((w) => w >= b.start && w <= b.stop),
      ),
    };
  });
  const layers = arr(stack.layers).map((raw) => {
    const l = obj(raw);
    return { material: str(l.material, "?"), thickness: num(l.thickness), locked: bool(l.locked) };
  });
  return {
    id: str(s.id),
    status,
    releasedAt: str(s.releasedAt),
    releasedBy: name(s.releasedBy),
    workspace: name(s.workspace),
    program: {
      name: str(program.name),
      customer: str(program.customer),
      application: str(program.application),
      protective: bool(program.protective),
      targetYield: num(program.targetYield),
      version: num(program.version),
      minEvidenceTrials: num(program.minEvidenceTrials),
      confidence: num(program.confidence),
    },
    design: name(s.design),
    revision: {
      number: num(revision.number),
      hash: str(revision.hash),
      note: str(revision.note),
      author: name(revision.author),
      createdAt: str(revision.createdAt),
      layers,
      stackLine: `Incident medium ${str(stack.incident, "?")}; reference wavelength ${str(stack.referenceWavelength, "?")} nm; substrate ${str(substrate.material, "?")}, ${str(substrate.thicknessMm, "?")} mm${substrate.backside ? ", back surface counted" : ""}; exit medium ${str(stack.exit, "?")}. Layer 1 is next to the substrate.`,
    },
    bands,
    colour,
    run: run
      ? {
          id: str(run.id),
          trials: num(run.trials),
          seed: str(run.seed),
          errorModel: (() => {
            try {
              return JSON.stringify(run.errorModel ?? null);
            } catch {
              return "";
            }
          })(),
          errorModelText: describeErrorModel(run.errorModel),
          engineVersion: str(run.engineVersion),
          yield: num(run.yield),
          passCount: num(run.passCount),
          low95: num(interval.low),
          high95: num(interval.high),
          clientVerified: bool(run.clientVerified),
        }
      : null,
    evidence: evidence
      ? {
          kind: str(evidence.kind, "evidence"),
          programVersion: num(evidence.programVersion),
          seedRule: str(evidence.seedRule),
          lowerBound: num(figures.lowerBound),
          confidence: num(figures.confidence),
          minTrials: num(figures.minTrials),
          targetYield: num(figures.targetYield),
          pass: typeof figures.pass === "boolean" ? figures.pass : null,
        }
      : null,
    deviation: {
      required: bool(dev.required),
      bands: arr(dev.bands).map((b) => ({ id: str(obj(b).id), change: str(obj(b).change) })),
      status: current ? str(current.status) : null,
      reason: str(current?.reason),
      requestedBy: name(current?.requestedBy),
      requestedAt: str(current?.requestedAt),
      decidedBy: name(current?.decidedBy),
      decidedAt: str(current?.decidedAt),
      decisionNote: str(current?.decisionNote),
    },
    plots,
    decisions: arr(s.decisions).map((raw) => {
      const d = obj(raw);
      return {
        at: str(d.at),
        action: str(d.action),
        actor: name(d.actor),
        note: str(d.note),
        programVersion: num(d.programVersion),
      };
    }),
    threads: {
      total: num(obj(s.threads).total) ?? 0,
      open: num(obj(s.threads).open) ?? 0,
      resolved: num(obj(s.threads).resolved) ?? 0,
    },
    caution: typeof s.caution === "string" ? s.caution : null,
  };
}

/**
 * Runs of sample indices to draw as one line or one shaded area: a series is split where its wavelengths jump by
 * more than three times the steps on either side of the jump (the gap between two bands, e.g. a blocking range on
 * each side of a passband), so nothing is drawn where nothing was computed.
 */
export function plotSegments(wavelengths: readonly number[]): number[][] {
  const step = (i: number) => {
    const a = wavelengths[i - 1];
    const b = wavelengths[i];
    return a === undefined || b === undefined ? 0 : b - a;
  };
  const out: number[][] = [];
  let run: number[] = [];
  wavelengths.forEach((_, i) => {
    const d = step(i);
    const around = Math.max(step(i - 1), step(i + 1));
    if (run.length > 0 && around > 0 && d > 3 * around) {
      out.push(run);
      run = [];
    }
    run.push(i);
  });
  if (run.length > 0) out.push(run);
  return out;
}

/** The words under a plot: quantity and conditions (or angle and polarization on older records). */
export function plotCaption(p: RecordPlot): string {
  return `${p.quantity} (${p.quantity === "OD" ? "optical density" : "%"}), ${p.conditions ?? `${p.angleDeg}°, polarization ${p.polarization}`}`;
}

/** Axis range of a plot: the finite values of every curve and the band limits, padded by 5 %. */
export function plotRange(p: RecordPlot): { x0: number; x1: number; y0: number; y1: number } {
  const xs = p.wavelengths.filter(Number.isFinite);
  const ys: number[] = [];
  for (const c of [p.nominal, p.low ?? [], p.high ?? []]) for (const v of c) if (v !== null) ys.push(v);
  for (const b of p.bands) if (b.value !== null) ys.push(b.value);
  const x0 = xs.length ? Math.min(...xs) : 0;
  let x1 = xs.length ? Math.max(...xs) : 1;
  let y0 = ys.length ? Math.min(...ys) : 0;
  let y1 = ys.length ? Math.max(...ys) : 1;
  if (p.quantity !== "OD") {
    y0 = Math.max(0, Math.min(y0, 0));
    y1 = Math.min(100, Math.max(y1, y0 + 1));
  }
  if (x1 <= x0) x1 = x0 + 1;
  if (y1 <= y0) y1 = y0 + 1;
  const pad = (y1 - y0) * 0.05;
  return { x0, x1, y0: p.quantity === "OD" ? y0 - pad : Math.max(0, y0 - pad), y1: y1 + pad };
}

export const ACTION_LABEL: Record<string, string> = {
  submit: "Submitted for review",
  request_changes: "Changes requested",
  approve: "Approved",
  release: "Released",
  withdraw: "Withdrawn",
  return_to_review: "Returned to review (program changed)",
};

export const REQUIREMENT_LABEL: Record<string, string> = {
  min: "every point ≥",
  max: "every point ≤",
  avgMin: "average ≥",
  avgMax: "average ≤",
};

export const unitOf = (quantity: string) => (quantity === "OD" ? " OD" : " %");
