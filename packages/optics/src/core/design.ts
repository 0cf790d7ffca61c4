/**
 * The Stackproof design file, format "stackproof.design/v1".
 *
 * Units: layer thickness is physical thickness in nm, substrate thickness in mm, reference
 * wavelength in nm. Layers are listed in DEPOSITION ORDER: `layers[0]` is deposited first and
 * touches the substrate; the last layer faces the incident medium. Light arrives from the
 * incident medium onto the coated side. Indices follow N = n − ik.
 */
import { z } from "zod";
import { getMaterial } from "./library.ts";
import { assertPhysicalIndex, indexTable, MaterialSchema, refractiveIndex, type Material } from "./materials.ts";

/** Format tag written in every design file. */
export const DESIGN_FORMAT = "stackproof.design/v1";

const positiveNm = z
  .number({ error: "expected a number" })
  .positive({ error: "expected a number > 0" });

/**
 * Largest physical thickness of one layer, nm (1 mm). Thin-film layers are at most a few µm; a
 * coherent "layer" thicker than a millimetre is a plate, whose interference no real source
 * resolves (use the incoherent substrate), and the bound keeps the phase 2πnd/λ well inside the
 * range where double-precision trigonometry is exact to ~1e-10.
 */
export const MAX_LAYER_THICKNESS_NM = 1e6;
/** Largest substrate thickness, mm (1 m): far beyond any coated part, small enough for exp(−αd). */
export const MAX_SUBSTRATE_THICKNESS_MM = 1e3;

/** One layer: a material id and its physical thickness in nm. */
export const LayerSchema = z.object({
  material: z.string({ error: "expected a material id" }).min(1, { error: "expected a material id" }),
  thickness: z
    .number({ error: "expected a number ≥ 0" })
    .min(0, { error: "expected a number ≥ 0" })
    .max(MAX_LAYER_THICKNESS_NM, { error: `expected at most ${MAX_LAYER_THICKNESS_NM} nm (1 mm)` }),
  locked: z.boolean({ error: "expected true or false" }).optional(),
  label: z.string({ error: "expected a string" }).optional(),
});
/** One validated layer (thickness in nm). */
export type Layer = z.output<typeof LayerSchema>;

/** Substrate: material id, thickness in mm, and whether its back surface is counted (incoherently). */
export const SubstrateSchema = z.object({
  material: z.string({ error: "expected a material id" }).min(1, { error: "expected a material id" }),
  thicknessMm: z
    .number({ error: "expected a number ≥ 0" })
    .min(0, { error: "expected a number ≥ 0" })
    .max(MAX_SUBSTRATE_THICKNESS_MM, { error: `expected at most ${MAX_SUBSTRATE_THICKNESS_MM} mm` }),
  backside: z.boolean({ error: "expected true or false" }),
});
/** The validated substrate (thickness in mm). */
export type Substrate = z.output<typeof SubstrateSchema>;

/** Zod schema of a design file. */
export const DesignSchema = z.object({
  format: z.literal(DESIGN_FORMAT, { error: `expected "${DESIGN_FORMAT}"` }),
  name: z.string({ error: "expected a string" }),
  referenceWavelength: positiveNm,
  incident: z.string({ error: "expected a material id" }).min(1).default("air"),
  layers: z.array(LayerSchema, { error: "expected an array of layers" }),
  substrate: SubstrateSchema,
  exit: z.string({ error: "expected a material id" }).min(1).default("air"),
  materials: z.array(MaterialSchema, { error: "expected an array of materials" }).optional(),
});

/** A validated design (defaults applied). */
export type Design = z.output<typeof DesignSchema>;
/** A design as written in JSON (incident/exit may be omitted). */
export type DesignInput = z.input<typeof DesignSchema>;

/**
 * JSON Schema (draft 2020-12) of the design file as written (input side: `incident` and `exit`
 * optional), generated from {@link DesignSchema}; for API documentation and editors.
 * Cross-field checks (material ids resolve, table points sorted) are only done by parseDesign.
 */
export function designJsonSchema(): Record<string, unknown> {
  return z.toJSONSchema(DesignSchema, { io: "input" }) as Record<string, unknown>;
}

function formatPath(path: readonly PropertyKey[]): string {
  let out = "";
  for (const p of path) {
    if (typeof p === "number") out += `[${p}]`;
    else out += out === "" ? String(p) : `.${String(p)}`;
  }
  return out === "" ? "(design)" : out;
}

function valueAt(input: unknown, path: readonly PropertyKey[]): unknown {
  let v: unknown = input;
  for (const p of path) {
    if (v === null || typeof v !== "object") return undefined;
    v = (v as Record<PropertyKey, unknown>)[p];
  }
  return v;
}

function describeValue(v: unknown): string {
  if (v === undefined) return "nothing";
  if (typeof v === "number") return String(v);
  if (typeof v === "string") return JSON.stringify(v.length > 60 ? v.slice(0, 57) + "..." : v);
  if (Array.isArray(v)) return `an array of ${v.length}`;
  if (v === null) return "null";
  if (typeof v === "object") return "an object";
  return String(v);
}

function cleanMessage(message: string): string {
  return message.replace(/^Invalid input: /, "");
}

/**
 * Validate unknown input (parsed JSON) as a design and check that every material id resolves
 * (design-local `materials` first, then the library).
 *
 * @throws RangeError whose message names the field path and the offending value, e.g.
 *   `layers[3].thickness: expected a number ≥ 0, got -5`
 */
export function parseDesign(input: unknown): Design {
  const result = DesignSchema.safeParse(input);
  if (!result.success) {
    const issue = result.error.issues[0];
    if (!issue) throw new RangeError("design: invalid input");
    const path = issue.path;
    throw new RangeError(
      `${formatPath(path)}: ${cleanMessage(issue.message)}, got ${describeValue(valueAt(input, path))}`,
    );
  }
  const design = result.data;
  const custom = design.materials;
  const check = (id: string, where: string): void => {
    try {
      getMaterial(id, custom);
    } catch {
      throw new RangeError(`${where}: unknown material id, got ${JSON.stringify(id)}`);
    }
  };
  check(design.incident, "incident");
  design.layers.forEach((l, i) => check(l.material, `layers[${i}].material`));
  check(design.substrate.material, "substrate.material");
  check(design.exit, "exit");
  return design;
}

/**
 * Physical thickness (nm) of a layer of `qwot` quarter-wave optical thicknesses at the
 * reference wavelength: d = qwot · λ0 / (4 n(λ0)).
 */
export function qwotToThickness(qwot: number, n: number, referenceNm: number): number {
  if (!(n > 0)) throw new RangeError(`qwotToThickness: expected n > 0, got ${n}`);
  if (!(referenceNm > 0)) throw new RangeError(`qwotToThickness: expected λ0 > 0 nm, got ${referenceNm}`);
  return (qwot * referenceNm) / (4 * n);
}

/** Quarter-wave optical thickness count of a layer: QWOT = 4 n(λ0) d / λ0 (d and λ0 in nm). */
export function thicknessToQwot(thicknessNm: number, n: number, referenceNm: number): number {
  if (!(referenceNm > 0)) throw new RangeError(`thicknessToQwot: expected λ0 > 0 nm, got ${referenceNm}`);
  return (4 * n * thicknessNm) / referenceNm;
}

/** A layer given in QWOT units for {@link designFromQwots}. */
export interface QwotLayer {
  material: string;
  /** quarter-wave optical thicknesses at the reference wavelength (1 = λ0/4, 2 = half wave) */
  qwot: number;
  locked?: boolean;
  label?: string;
}

/** Arguments of {@link designFromQwots}. */
export interface QwotDesignSpec {
  name: string;
  /** reference wavelength λ0, nm */
  referenceWavelength: number;
  incident?: string;
  /** layers in deposition order (first = next to the substrate) */
  layers: readonly QwotLayer[];
  substrate: { material: string; thicknessMm: number; backside: boolean };
  exit?: string;
  materials?: Material[];
}

/**
 * Build a validated design from layers written in QWOT units at λ0 (n taken from each
 * material's dispersion model at λ0, k ignored).
 */
export function designFromQwots(spec: QwotDesignSpec): Design {
  const layers = spec.layers.map((l) => {
    const n = refractiveIndex(getMaterial(l.material, spec.materials).model, spec.referenceWavelength).n;
    const layer: Layer = { material: l.material, thickness: qwotToThickness(l.qwot, n, spec.referenceWavelength) };
    if (l.locked !== undefined) layer.locked = l.locked;
    if (l.label !== undefined) layer.label = l.label;
    return layer;
  });
  return parseDesign({
    format: DESIGN_FORMAT,
    name: spec.name,
    referenceWavelength: spec.referenceWavelength,
    incident: spec.incident ?? "air",
    layers,
    substrate: { ...spec.substrate },
    exit: spec.exit ?? "air",
    ...(spec.materials ? { materials: spec.materials } : {}),
  });
}

/** QWOT of every layer at the design's reference wavelength, in deposition order. */
export function layerQwots(design: Design): number[] {
  return design.layers.map((l) => {
    const n = refractiveIndex(getMaterial(l.material, design.materials).model, design.referenceWavelength).n;
    return thicknessToQwot(l.thickness, n, design.referenceWavelength);
  });
}

/**
 * Check the physical inputs of a design before it is stored or evaluated: every layer thickness
 * finite, 0 ≤ d ≤ {@link MAX_LAYER_THICKNESS_NM} nm, the substrate 0 ≤ d ≤
 * {@link MAX_SUBSTRATE_THICKNESS_MM} mm, and every material the design uses (incident medium,
 * layers, substrate, exit medium) giving finite n with 0 < n ≤ 1000 and finite k with
 * 0 ≤ k ≤ 1000 at every wavelength the design is evaluated at (N = n − ik). Call it when a
 * revision is saved, with the wavelengths of its spec mask and chart.
 *
 * @param design  a design (validated or not: it is parsed first)
 * @param wavelengths  evaluation wavelengths, nm
 * @returns the parsed design
 * @throws RangeError naming the field and value, or the material, its model kind and the
 *   wavelength, e.g. `layers[2].material: material "HiN" (cauchy model) gives n = -0.2 at 1800 nm …`
 */
export function checkDesignInputs(design: unknown, wavelengths: ArrayLike<number>): Design {
  const d = parseDesign(design);
  d.layers.forEach((l, i) => {
    if (!Number.isFinite(l.thickness) || l.thickness < 0 || l.thickness > MAX_LAYER_THICKNESS_NM) {
      throw new RangeError(
        `layers[${i}].thickness: expected a finite number 0–${MAX_LAYER_THICKNESS_NM} nm, got ${String(l.thickness)}`,
      );
    }
  });
  const sub = d.substrate.thicknessMm;
  if (!Number.isFinite(sub) || sub < 0 || sub > MAX_SUBSTRATE_THICKNESS_MM) {
    throw new RangeError(`substrate.thicknessMm: expected a finite number 0–${MAX_SUBSTRATE_THICKNESS_MM} mm, got ${String(sub)}`);
  }
  for (let i = 0; i < wavelengths.length; i++) {
    const w = wavelengths[i] as number;
    if (!(w > 0) || !Number.isFinite(w)) {
      throw new RangeError(`wavelengths[${i}]: expected a finite number > 0 nm, got ${String(w)}`);
    }
  }
  const uses: [string, string][] = [["incident", d.incident]];
  d.layers.forEach((l, i) => uses.push([`layers[${i}].material`, l.material]));
  uses.push(["substrate.material", d.substrate.material], ["exit", d.exit]);
  const seen = new Set<string>();
  for (const [where, id] of uses) {
    if (seen.has(id)) continue;
    seen.add(id);
    const m = getMaterial(id, d.materials);
    try {
      const t = indexTable(m.model, wavelengths);
      assertPhysicalIndex(id, m.model, wavelengths, t);
    } catch (e) {
      if (e instanceof RangeError) {
        const msg = e.message.startsWith("material ") ? e.message : `material "${id}" (${m.model.kind} model): ${e.message}`;
        throw new RangeError(`${where}: ${msg}`);
      }
      throw e;
    }
  }
  return d;
}
