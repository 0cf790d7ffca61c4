import { describe, expect, it } from "vitest";
import { fitAsBuilt, withThicknesses } from "../../src/studies/index.ts";
import { computeSpectrum } from "../../src/core/index.ts";
import type { Design } from "../../src/core/index.ts";
import { qwotDesign } from "./fixtures.ts";

// Seven-layer H/L stack with unequal QWOTs at 550 nm on glass n = 1.52. (A strictly periodic quarter-wave stack
// is a poor test: its T spectrum admits near-equivalent thickness sets, and the fit can settle on one of them.)
const design: Design = qwotDesign([
  ["H230", 1],
  ["L138", 1.3],
  ["H230", 0.7],
  ["L138", 1.6],
  ["H230", 0.9],
  ["L138", 1.2],
  ["H230", 0.8],
]);
const injected = [3, -2, 4, -3, 1.5, -1, 2.5]; // percent
const wavelengths = Array.from({ length: 161 }, (_, i) => 400 + i * 2.5);

// Index and thickness errors both shift phase; only the admittance change separates them, which needs a wide range.
const wide = Array.from({ length: 161 }, (_, i) => 400 + i * 5);

function measured(d: Design, scaleOf?: (material: string) => number, grid = wavelengths): number[] {
  const built = withThicknesses(
    d,
    d.layers.map((l, i) => l.thickness * (1 + (injected[i] as number) / 100)),
  );
  if (scaleOf && built.materials) {
    built.materials = built.materials.map((m) =>
      m.model.kind === "constant" ? { ...m, model: { ...m.model, n: m.model.n * scaleOf(m.id) } } : m,
    );
  }
  return Array.from(computeSpectrum(built, { wavelengths: grid }).u.T, (t) => t * 100);
}

describe("fitAsBuilt", () => {
  it("recovers injected per-layer thickness errors from a synthetic transmittance measurement", () => {
    const values = measured(design);
    const fit = fitAsBuilt(design, { wavelengths, values, quantity: "T", angleDeg: 0, polarization: "u" });
    fit.thicknessErrorsPct.forEach((e, i) => expect(e).toBeCloseTo(injected[i] as number, 3));
    expect(fit.residualRms).toBeLessThan(1e-4);
    expect(fit.indexScale).toEqual({ H230: 1, L138: 1 });
    fit.fittedSpectrum.forEach((v, i) => expect(v).toBeCloseTo(values[i] as number, 3));
  });

  it("with fitIndexScale also recovers a 1 % index error of the high-index material (400–1200 nm)", () => {
    const values = measured(design, (id) => (id === "H230" ? 1.01 : 1), wide);
    const fit = fitAsBuilt(
      design,
      { wavelengths: wide, values, quantity: "T", angleDeg: 0, polarization: "u" },
      { fitIndexScale: true },
    );
    expect(fit.residualRms).toBeLessThan(1e-6);
    expect(fit.indexScale.H230).toBeCloseTo(1.01, 6);
    expect(fit.indexScale.L138).toBeCloseTo(1, 6);
    fit.thicknessErrorsPct.forEach((e, i) => expect(e).toBeCloseTo(injected[i] as number, 4));
  });

  it("rejects bad measurements with a RangeError naming the value", () => {
    expect(() =>
      fitAsBuilt(design, {
        wavelengths: [500, 600],
        values: [1],
        quantity: "T",
        angleDeg: 0,
        polarization: "u",
      }),
    ).toThrow(/measurement\.values: expected 2 values, got 1/);
    expect(() =>
      fitAsBuilt(design, {
        wavelengths: [500, -600],
        values: [1, 2],
        quantity: "T",
        angleDeg: 0,
        polarization: "u",
      }),
    ).toThrow(/measurement\.wavelengths\[1\].*got -600/);
  });
});
