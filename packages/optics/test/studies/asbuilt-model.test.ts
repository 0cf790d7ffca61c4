import { describe, expect, it } from "vitest";
import { modelAtMeasurement, parseDesign } from "../../src/index.ts";

describe("modelAtMeasurement", () => {
  it("gives bare glass (n = 1.52) its Fresnel reflectance, 4.26 % at normal incidence (Hecht, Optics, Fresnel equations)", () => {
    const design = parseDesign({
      format: "stackproof.design/v1",
      name: "bare",
      referenceWavelength: 550,
      incident: "air",
      exit: "air",
      layers: [],
      materials: [
        {
          id: "g152",
          name: "glass 1.52",
          model: { kind: "constant", n: 1.52 },
          role: "substrate",
          source: "test value",
        },
      ],
      substrate: { material: "g152", thicknessMm: 1, backside: false },
    });
    const r = modelAtMeasurement(design, {
      wavelengths: [500, 600],
      quantity: "R",
      angleDeg: 0,
      polarization: "u",
    });
    const fresnel = ((1.52 - 1) / (1.52 + 1)) ** 2 * 100;
    expect(r[0]).toBeCloseTo(fresnel, 10);
    expect(r[1]).toBeCloseTo(fresnel, 10);
    const t = modelAtMeasurement(design, {
      wavelengths: [500],
      quantity: "T",
      angleDeg: 0,
      polarization: "u",
    });
    expect(t[0]).toBeCloseTo(100 - fresnel, 10); // lossless: R + T = 1
  });
});
