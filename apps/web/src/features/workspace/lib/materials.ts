import { getMaterial, MATERIAL_LIBRARY, refractiveIndex, qwotToThickness, thicknessToQwot } from "@stackproof/optics";
import type { Design, Material } from "@stackproof/optics";

/** A material as listed by GET /materials (built-in library plus the workspace's own). */
export interface MaterialOption {
  id: string;
  name: string;
  role: Material["role"];
  source: string;
  builtIn: boolean;
  model: Material["model"];
}

export function libraryOptions(): MaterialOption[] {
  return MATERIAL_LIBRARY.map((m) => ({ ...m, builtIn: true }));
}

/** n at λ0 (nm) of a material, NaN when it cannot be evaluated there. */
export function indexAt(materialId: string, referenceNm: number, custom?: readonly Material[]): number {
  try {
    return refractiveIndex(getMaterial(materialId, custom).model, referenceNm).n;
  } catch {
    return Number.NaN;
  }
}

export function toQwot(thicknessNm: number, materialId: string, design: Design): number {
  const n = indexAt(materialId, design.referenceWavelength, design.materials);
  return Number.isFinite(n) ? thicknessToQwot(thicknessNm, n, design.referenceWavelength) : Number.NaN;
}

export function fromQwot(qwot: number, materialId: string, design: Design): number {
  const n = indexAt(materialId, design.referenceWavelength, design.materials);
  return Number.isFinite(n) && n > 0 ? qwotToThickness(qwot, n, design.referenceWavelength) : Number.NaN;
}

/**
 * The design with the workspace materials it uses copied into `design.materials`, so that the stack file is
 * self-contained and the engine can resolve every id.
 */
export function withWorkspaceMaterials(design: Design, options: readonly MaterialOption[]): Design {
  const used = new Set([design.incident, design.exit, design.substrate.material, ...design.layers.map((l) => l.material)]);
  const local = new Map((design.materials ?? []).map((m) => [m.id, m]));
  let added = false;
  for (const o of options) {
    if (o.builtIn || !used.has(o.id) || local.has(o.id)) continue;
    local.set(o.id, { id: o.id, name: o.name, role: o.role, source: o.source, model: o.model });
    added = true;
  }
  return added ? { ...design, materials: [...local.values()] } : design;
}
