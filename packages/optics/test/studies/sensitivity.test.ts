import { describe, expect, it } from "vitest";
import { evaluateSpec, sensitivityMap, specSensitivity } from "../../src/studies/index.ts";
import type { SpecMask } from "../../src/studies/index.ts";
import { qwotDesign, TEST_MATERIALS } from "./fixtures.ts";

// Single film on a substrate, normal incidence (Airy summation; Hecht, Optics, thin films; Macleod):
// r = (r1 + r2 e^{−2iδ}) / (1 + r1 r2 e^{−2iδ}), δ = 2π n d / λ,
// R = (r1² + r2² + 2 r1 r2 cos 2δ) / (1 + r1² r2² + 2 r1 r2 cos 2δ); dR/dd follows by the chain rule.
function singleFilmDRdd(n0: number, n1: number, ns: number, d: number, lambda: number): number {
  const r1 = (n0 - n1) / (n0 + n1);
  const r2 = (n1 - ns) / (n1 + ns);
  const c = Math.cos((4 * Math.PI * n1 * d) / lambda);
  const s = Math.sin((4 * Math.PI * n1 * d) / lambda);
  const num = r1 * r1 + r2 * r2 + 2 * r1 * r2 * c;
  const den = 1 + r1 * r1 * r2 * r2 + 2 * r1 * r2 * c;
  const dc = (-s * 4 * Math.PI * n1) / lambda;
  return (2 * r1 * r2 * dc * den - num * (2 * r1 * r2 * dc)) / (den * den);
}

describe("sensitivityMap", () => {
  it("matches the analytic derivative of the single-film reflectance", () => {
    const design = qwotDesign([["H230", 1.3]]);
    const d = design.layers[0]!.thickness;
    const wavelengths = [450, 500, 550, 600, 700];
    const map = sensitivityMap(design, { wavelengths, angleDeg: 0, polarization: "s", quantity: "R" });
    expect(map.matrix).toHaveLength(1);
    wavelengths.forEach((w, i) => {
      const analytic = singleFilmDRdd(1, 2.3, 1.52, d, w) * 100; // percentage points per nm
      expect(map.matrix[0]![i]).toBeCloseTo(analytic, 4); // central-difference truncation error ~1e-6
    });
  });

  it("is zero at λ0 for a quarter-wave layer: R is stationary there (Macleod, quarter-wave layer)", () => {
    const map = sensitivityMap(qwotDesign([["L138", 1]]), {
      wavelengths: [550],
      angleDeg: 0,
      polarization: "u",
      quantity: "T",
    });
    expect(Math.abs(map.matrix[0]![0]!)).toBeLessThan(1e-6);
  });

  it("rejects bad options with a RangeError naming the value", () => {
    expect(() =>
      sensitivityMap(qwotDesign([["L138", 1]]), {
        wavelengths: [550],
        angleDeg: 0,
        polarization: "u",
        quantity: "A" as "R",
      }),
    ).toThrow(/quantity: expected "R" or "T", got A/);
  });
});

describe("specSensitivity", () => {
  const mask: SpecMask = {
    bands: [
      {
        id: "r600",
        start: 600,
        stop: 600,
        quantity: "R",
        polarization: "u",
        angleDeg: 0,
        requirement: "max",
        value: 5,
      },
      {
        id: "t450",
        start: 450,
        stop: 450,
        quantity: "T",
        polarization: "u",
        angleDeg: 0,
        requirement: "min",
        value: 90,
      },
    ],
  };
  const design = qwotDesign([
    ["H230", 1],
    ["L138", 1.2],
  ]);

  it("thickness derivatives agree with the sensitivity map (margin of a max-R band = limit − R)", () => {
    const sens = specSensitivity(design, mask);
    const map = sensitivityMap(design, { wavelengths: [600], angleDeg: 0, polarization: "u", quantity: "R" });
    sens.bands[0]!.thickness.forEach((g, j) => expect(g).toBeCloseTo(-map.matrix[j]![0]!, 6));
    expect(sens.criticalLayers).toHaveLength(2);
    expect(sens.criticalLayers[0]!.score).toBeGreaterThanOrEqual(sens.criticalLayers[1]!.score);
  });

  it("index derivative agrees with re-evaluating a design whose material index is raised by 0.1 %", () => {
    const sens = specSensitivity(design, mask);
    const base = evaluateSpec(design, mask).bands[0]!.margin;
    const raised = {
      ...design,
      materials: TEST_MATERIALS.map((m) =>
        m.id === "H230" ? { ...m, model: { ...m.model, n: 2.3 * 1.001 } } : m,
      ),
    };
    const shifted = evaluateSpec(raised, mask).bands[0]!.margin;
    // forward difference over 0.1 %, expressed per 1 %
    expect(sens.bands[0]!.index.H230).toBeCloseTo((shifted - base) / 0.1, 2);
  });
});
