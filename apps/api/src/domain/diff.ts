// Layer-by-layer difference between two stacks.
//
// Rule: layers are aligned BY INDEX in deposition order (index 0 touches the substrate). Index i present in
// both stacks is "changed" when its material, thickness or locked flag differ; indices beyond the shorter
// stack are "added" (only in the newer stack) or "removed" (only in the older one). An inserted layer
// therefore shows as changes from that index on plus one addition — the simple rule reviewers can check by eye.
import type { Design, Layer } from "@stackproof/optics";

export interface StackDiff {
  added: { index: number; layer: Layer }[];
  removed: { index: number; layer: Layer }[];
  changed: { index: number; before: Layer; after: Layer; deltaNm: number; materialChanged: boolean }[];
  unchanged: number;
  /** Other differences (substrate, media, reference wavelength), as sentences. */
  other: string[];
  totalThicknessDeltaNm: number;
  summary: string;
}

/** Thickness differences below this are treated as equal (nm), to ignore float noise from unit conversion. */
const EPS_NM = 1e-9;

const round = (x: number) => Math.round(x * 1000) / 1000;

export function diffStacks(before: Design, after: Design): StackDiff {
  const added: StackDiff["added"] = [];
  const removed: StackDiff["removed"] = [];
  const changed: StackDiff["changed"] = [];
  let unchanged = 0;
  const n = Math.max(before.layers.length, after.layers.length);
  for (let i = 0; i < n; i++) {
    const a = before.layers[i];
    const b = after.layers[i];
    if (a && b) {
      const materialChanged = a.material !== b.material;
      const delta = b.thickness - a.thickness;
      if (materialChanged || Math.abs(delta) > EPS_NM || (a.locked ?? false) !== (b.locked ?? false)) {
        changed.push({ index: i, before: a, after: b, deltaNm: round(delta), materialChanged });
      } else unchanged++;
    } else if (b) added.push({ index: i, layer: b });
    else if (a) removed.push({ index: i, layer: a });
  }
  const other: string[] = [];
  if (before.substrate.material !== after.substrate.material) {
    other.push(`substrate ${before.substrate.material} → ${after.substrate.material}`);
  }
  if (before.substrate.thicknessMm !== after.substrate.thicknessMm) {
    other.push(`substrate thickness ${before.substrate.thicknessMm} mm → ${after.substrate.thicknessMm} mm`);
  }
  if (before.substrate.backside !== after.substrate.backside)
    other.push(`substrate back surface ${after.substrate.backside ? "counted" : "not counted"}`);
  if (before.incident !== after.incident)
    other.push(`incident medium ${before.incident} → ${after.incident}`);
  if (before.exit !== after.exit) other.push(`exit medium ${before.exit} → ${after.exit}`);
  if (before.referenceWavelength !== after.referenceWavelength) {
    other.push(`reference wavelength ${before.referenceWavelength} nm → ${after.referenceWavelength} nm`);
  }
  const total = (d: Design) => d.layers.reduce((s, l) => s + l.thickness, 0);
  const totalDelta = round(total(after) - total(before));
  const parts: string[] = [];
  if (changed.length) parts.push(`${changed.length} layer${changed.length === 1 ? "" : "s"} changed`);
  if (added.length) parts.push(`${added.length} added`);
  if (removed.length) parts.push(`${removed.length} removed`);
  if (parts.length === 0) parts.push("layers identical");
  parts.push(`total physical thickness ${totalDelta >= 0 ? "+" : ""}${totalDelta.toFixed(1)} nm`);
  const summary = [parts.join(", "), ...other].join("; ");
  return { added, removed, changed, unchanged, other, totalThicknessDeltaNm: totalDelta, summary };
}
