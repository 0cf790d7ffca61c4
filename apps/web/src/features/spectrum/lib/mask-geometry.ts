// Spec mask → what the chart draws: forbidden regions per band and the curve samples that violate them.
import { bandConditionsText, bandLimit } from "@stackproof/optics";
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
    conditions: bandConditionsText(band),
  }));
}
