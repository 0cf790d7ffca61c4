import { describe, expect, it } from "vitest";
import { parseDesign } from "@stackproof/optics";
import { createSpectrumEngine, thicknessesOf } from "./spectrum-engine.ts";
import type { SpectrumSettings } from "./spectrum-engine.ts";
import { segments } from "../components/spectrum-chart.tsx";

// A quarter wave of n1 = 1.38 at 550 nm on a glass of n = 1.52, no back surface: constant indices so that the
// closed form applies.
const singleAr = parseDesign({
  format: "stackproof.design/v1",
  name: "single-layer AR",
  referenceWavelength: 550,
  layers: [{ material: "n138", thickness: 550 / (4 * 1.38) }],
  substrate: { material: "n152", thicknessMm: 1, backside: false },
  materials: [
    { id: "n138", name: "n = 1.38", role: "layer", source: "test constant", model: { kind: "constant", n: 1.38 } },
    { id: "n152", name: "n = 1.52", role: "substrate", source: "test constant", model: { kind: "constant", n: 1.52 } },
  ],
});

const at = (s: Partial<SpectrumSettings> = {}): SpectrumSettings => ({ start: 450, stop: 650, points: 201, angleDeg: 0, coneHalfAngleDeg: 0, polarization: "u", ...s });

describe("live spectrum engine", () => {
  it("gives the single-layer AR reflectance at λ0", () => {
    const spec = createSpectrumEngine(singleAr, at()).compute(thicknessesOf(singleAr));
    const i = spec.wavelengths.findIndex((w) => Math.abs(w - 550) < 1e-9);
    // R = ((n0 ns − n1²)/(n0 ns + n1²))² at the quarter-wave point (Macleod, Thin-Film Optical Filters, single-layer AR): ≈ 1.26 %
    const expected = ((1.52 - 1.38 ** 2) / (1.52 + 1.38 ** 2)) ** 2;
    expect(spec.R[i]).toBeCloseTo(expected, 10);
    expect(expected * 100).toBeCloseTo(1.26, 2);
  });

  it("conserves energy (R + T = 1 for a lossless stack) with and without a cone, in every polarization", () => {
    for (const polarization of ["s", "p", "u"] as const) {
      for (const s of [at({ polarization, angleDeg: 30 }), at({ polarization, angleDeg: 20, coneHalfAngleDeg: 8 })]) {
        const spec = createSpectrumEngine(singleAr, s).compute(thicknessesOf(singleAr));
        for (let i = 0; i < spec.wavelengths.length; i++) expect((spec.R[i] as number) + (spec.T[i] as number)).toBeCloseTo(1, 10);
      }
    }
  });

  it("tends to the collimated spectrum as the cone closes", () => {
    const t = thicknessesOf(singleAr);
    const flat = createSpectrumEngine(singleAr, at({ angleDeg: 10 })).compute(t);
    const narrow = createSpectrumEngine(singleAr, at({ angleDeg: 10, coneHalfAngleDeg: 0.5 })).compute(t);
    for (let i = 0; i < flat.R.length; i += 20) expect(narrow.R[i]).toBeCloseTo(flat.R[i] as number, 5);
  });

  it("splits sampled envelopes where the band grid jumps", () => {
    expect(segments([440, 442, 444, 530, 532, 534, 536])).toEqual([
      [0, 2],
      [3, 6],
    ]);
    expect(segments([])).toEqual([]);
  });
});
