// Defaults of the workspace chart for a revision's mask.
import type { Design, SpecMask } from "@stackproof/optics";
import { defaultRange } from "../../../features/spectrum/lib/spectrum-engine.ts";
import type { ChartView } from "../../../features/spectrum/components/spectrum-panel.tsx";
import type { ChartQuantity } from "../../../features/spectrum/lib/mask-geometry.ts";

export const CHART_POINTS = 1000;

export function defaultView(design: Design, mask: SpecMask | null | undefined): ChartView {
  const bands = mask?.bands ?? [];
  // colour requirements are judged over 380–780 nm: the chart shows that span too
  const range = defaultRange(
    (mask?.colour ?? []).length > 0 ? [...bands, { start: 380, stop: 780 }] : bands,
    design.referenceWavelength,
  );
  const first = bands[0];
  const used = new Set(bands.map((b) => b.quantity));
  const quantities: ChartQuantity[] =
    used.size === 0 ? ["R", "T"] : (["R", "T", "A"] as const).filter((q) => used.has(q));
  if (quantities.length === 0) quantities.push("T");
  return {
    settings: {
      start: range.start,
      stop: range.stop,
      points: CHART_POINTS,
      angleDeg: first?.angleRange?.fromDeg ?? first?.angleDeg ?? 0,
      coneHalfAngleDeg: 0,
      polarization: first?.polarization === "sp" || !first ? "u" : first.polarization,
    },
    quantities,
    scale: bands.length > 0 && bands.every((b) => b.quantity === "OD") ? "od" : "percent",
  };
}
