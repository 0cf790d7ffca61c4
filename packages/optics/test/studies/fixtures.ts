// Shared test designs: constant-index design-local materials so that hand calculations apply exactly.
import type { Design } from "../../src/core/index.ts";

const constant = (id: string, n: number, k = 0) => ({
  id,
  name: `test material n = ${n}`,
  model: { kind: "constant" as const, n, k },
  role: "layer" as const,
  source: "test value",
});

/** Materials: glass n = 1.52, L n = 1.38, M n = 1.70, H n = 2.30 (all lossless, dispersion-free). */
export const TEST_MATERIALS = [
  constant("glass152", 1.52),
  constant("L138", 1.38),
  constant("M170", 1.7),
  constant("H230", 2.3),
];

const index: Record<string, number> = { glass152: 1.52, L138: 1.38, M170: 1.7, H230: 2.3 };

/** Build a design on a glass n = 1.52 substrate (front surface only) from [material, QWOT at λ0] pairs in deposition order. */
export function qwotDesign(layers: [string, number][], referenceWavelength = 550, backside = false): Design {
  return {
    format: "stackproof.design/v1",
    name: "HTW test part",
    referenceWavelength,
    incident: "air",
    exit: "air",
    layers: layers.map(([material, q]) => ({
      material,
      thickness: (q * referenceWavelength) / (4 * (index[material] as number)),
    })),
    substrate: { material: "glass152", thicknessMm: 1, backside },
    materials: TEST_MATERIALS,
  };
}

/** The example four-layer visible AR of docs/examples (library materials on borosilicate crown glass). */
export function htwAr4(): Design {
  return {
    format: "stackproof.design/v1",
    name: "HTW-AR4 visible anti-reflection, revision B",
    referenceWavelength: 550,
    incident: "air",
    exit: "air",
    layers: [
      { material: "Ta2O5", thickness: 6.7 },
      { material: "Al2O3", thickness: 52.2 },
      { material: "Ta2O5", thickness: 125.4 },
      { material: "MgF2", thickness: 92.8 },
    ],
    substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
  };
}

/** Relative comparison helper: |a − b| ≤ rel · max(|a|, |b|) + abs. */
export function close(a: number, b: number, rel: number, abs = 0): boolean {
  return Math.abs(a - b) <= rel * Math.max(Math.abs(a), Math.abs(b)) + abs;
}
