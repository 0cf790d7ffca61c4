// Edit → new curve for the live chart: one layer of a 60-layer design changes, the 1000-wavelength spectrum is
// recomputed with the cached fast evaluator and turned into chart curves and SVG path data (what the chart
// renders). Run: pnpm vitest bench --run bench/   (target: well under 50 ms per edit)
import { bench, describe } from "vitest";
import { designFromQwots } from "@stackproof/optics";
import type { Design } from "@stackproof/optics";
import { computeLiveSpectrum } from "../src/features/spectrum/lib/use-live-spectrum.ts";
import { spectrumCurves } from "../src/features/spectrum/lib/curves.ts";
import type { SpectrumSettings } from "../src/features/spectrum/lib/spectrum-engine.ts";

const base: Design = designFromQwots({
  name: "bench 60 layers",
  referenceWavelength: 550,
  layers: Array.from({ length: 60 }, (_, i) => ({ material: i % 2 === 0 ? "Ta2O5" : "SiO2", qwot: 1 + 0.01 * (i % 7) })),
  substrate: { material: "boro-crown", thicknessMm: 1, backside: true },
});

const collimated: SpectrumSettings = { start: 400, stop: 800, points: 1000, angleDeg: 0, coneHalfAngleDeg: 0, polarization: "u" };
const tilted: SpectrumSettings = { ...collimated, angleDeg: 45 };

function pathOf(wl: ArrayLike<number>, v: ArrayLike<number>): string {
  // Same construction as the chart's CurvePath (linear scales inlined).
  let s = "";
  for (let i = 0; i < wl.length; i++) s += `${i === 0 ? "M" : "L"}${(((wl[i] as number) - 400) * 2).toFixed(1)},${(300 - (v[i] as number) * 3).toFixed(1)}`;
  return s;
}

let step = 0;
function editOnce(settings: SpectrumSettings): number {
  step++;
  const layers = base.layers.map((l, i) => (i === 30 ? { ...l, thickness: l.thickness + (step % 10) * 0.5 } : l));
  const design = { ...base, layers };
  const live = computeLiveSpectrum(design, settings);
  if (!live.ok) throw new Error(live.error);
  const curves = spectrumCurves(live.spectrum, ["R", "T"], { idPrefix: "n-", primary: true });
  let len = 0;
  for (const c of curves) len += pathOf(c.wavelengths, c.values).length;
  return len;
}

describe("edit one layer of 60, 1000 wavelengths → new curves", () => {
  // warm the evaluator cache (compiling happens once per stack structure, not per edit)
  editOnce(collimated);
  editOnce(tilted);
  bench("normal incidence, unpolarized (s and p)", () => {
    editOnce(collimated);
  });
  bench("45°, unpolarized (s and p)", () => {
    editOnce(tilted);
  });
});
