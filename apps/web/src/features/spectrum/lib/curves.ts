import { opticalDensity } from "./spectrum-engine.ts";
import type { Spectrum } from "./spectrum-engine.ts";
import type { ChartCurve } from "../components/spectrum-chart.tsx";
import type { ChartQuantity } from "./mask-geometry.ts";

export const QUANTITY_COLORS: Record<ChartQuantity, string> = {
  R: "#d98a2b",
  T: "#1f7f7a",
  A: "#6a4fa3",
  OD: "#13233a",
};

export const QUANTITY_NAMES: Record<ChartQuantity, string> = {
  R: "Reflectance",
  T: "Transmittance",
  A: "Absorptance",
  OD: "Optical density",
};

/** Chart curves of a spectrum for the chosen quantities (percent, or OD). */
export function spectrumCurves(
  spectrum: Spectrum,
  quantities: readonly ChartQuantity[],
  options: { idPrefix: string; labelPrefix?: string; primary?: boolean; dashed?: boolean; color?: (q: ChartQuantity) => string },
): ChartCurve[] {
  return quantities.map((q) => {
    const src = q === "R" ? spectrum.R : q === "T" ? spectrum.T : spectrum.A;
    const values = new Float64Array(src.length);
    if (q === "OD") for (let i = 0; i < src.length; i++) values[i] = opticalDensity(spectrum.T[i] as number);
    else for (let i = 0; i < src.length; i++) values[i] = (src[i] as number) * 100;
    return {
      id: `${options.idPrefix}${q}`,
      label: `${options.labelPrefix ?? ""}${q}`,
      quantity: q,
      wavelengths: spectrum.wavelengths,
      values,
      color: options.color ? options.color(q) : QUANTITY_COLORS[q],
      dashed: options.dashed,
      primary: options.primary,
    };
  });
}
