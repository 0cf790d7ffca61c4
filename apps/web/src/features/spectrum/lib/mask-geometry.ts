// Spec mask → what the chart draws: forbidden regions per band and the curve samples that violate them.
import { bandLimit } from "@stackproof/optics";
import type { SpecBand } from "@stackproof/optics";

export type ChartQuantity = "R" | "T" | "A" | "OD";

/** A band drawn on the chart: the region the curve must not enter. */
export interface ForbiddenRegion {
  bandId: string;
  label: string;
  quantity: ChartQuantity;
  start: number;
  stop: number;
  /** effective limit (value ∓ tolerance), percent or OD */
  limit: number;
  /** "below": values under the limit are forbidden (min bands); "above": over it (max bands) */
  side: "below" | "above";
  average: boolean;
  /** verdict of the band at its own conditions (angle, polarization), null when unknown */
  pass: boolean | null;
  conditions: string;
}

export function describeBand(band: SpecBand): string {
  const unit = band.quantity === "OD" ? "" : " %";
  const op = band.requirement === "min" ? "≥" : band.requirement === "max" ? "≤" : band.requirement === "avgMin" ? "avg ≥" : "avg ≤";
  return `${band.quantity} ${op} ${band.value}${unit}, ${band.start}–${band.stop} nm`;
}

export function forbiddenRegions(bands: readonly SpecBand[], verdicts: ReadonlyMap<string, boolean>): ForbiddenRegion[] {
  return bands.map((band) => ({
    bandId: band.id,
    label: band.label ?? describeBand(band),
    quantity: band.quantity,
    start: band.start,
    stop: band.stop,
    limit: bandLimit(band),
    side: band.requirement === "min" || band.requirement === "avgMin" ? "below" : "above",
    average: band.requirement === "avgMin" || band.requirement === "avgMax",
    pass: verdicts.get(band.id) ?? null,
    conditions: `${band.angleDeg}° ${band.polarization === "u" ? "unpolarized" : band.polarization}`,
  }));
}

/** Runs of consecutive sample indices where a curve lies inside a point-wise forbidden region. */
export function violationRuns(
  region: ForbiddenRegion,
  wavelengths: ArrayLike<number>,
  values: ArrayLike<number>,
): [number, number][] {
  if (region.average) return [];
  const runs: [number, number][] = [];
  let open = -1;
  for (let i = 0; i < wavelengths.length; i++) {
    const w = wavelengths[i] as number;
    const v = values[i] as number;
    const inside = w >= region.start && w <= region.stop;
    const bad = inside && (region.side === "below" ? v < region.limit : v > region.limit);
    if (bad && open < 0) open = i;
    if (!bad && open >= 0) {
      runs.push([open, i - 1]);
      open = -1;
    }
  }
  if (open >= 0) runs.push([open, wavelengths.length - 1]);
  return runs;
}
