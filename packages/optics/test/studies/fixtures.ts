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
export const TEST_MATERIALS = [constant("glass152", 1.52), constant("L138", 1.38), constant("M170", 1.7), constant("H230", 2.3)];

const index: Record<string, number> = { glass152: 1.52, L138: 1.38, M170: 1.7, H230: 2.3 };

/** Build a design on a glass n = 1.52 substrate (front surface only) from [material, QWOT at λ0] pairs in deposition order. */
export function qwotDesign(layers: [string, number][], referenceWavelength = 550, backside = false): Design {
  return {
    format: "stackproof.design/v1",
    name: "HTW test part",
    referenceWavelength,
    incident: "air",
    exit: "air",
    layers: layers.map(([material, q]) => ({ material, thickness: (q * referenceWavelength) / (4 * (index[material] as number)) })),
    substrate: { material: "glass152", thicknessMm: 1, backside },
    materials: TEST_MATERIALS,
  };
}

/** Four-layer visible AR, deposition order from the substrate: M 0.5, H 0.5? — see the spec tests for the values used. */
export function ar4Design(): Design {
  // Quarter-wave-based four-layer AR (substrate | M H H L | air, QWOTs 1, 0.5, 1.5? simplified): thicknesses below
  // were refined once with refineDesign against the 420–680 nm R ≤ 0.5 % mask and rounded to 0.1 nm.
  return {
    ...qwotDesign([]),
    layers: [
      { material: "M170", thickness: 80.9 },
      { material: "H230", thickness: 29.9 },
      { material: "L138", thickness: 22.3 },
      { material: "H230", thickness: 57.2 },
      { material: "L138", thickness: 98.6 },
    ],
  };
}

/** Relative comparison helper: |a − b| ≤ rel · max(|a|, |b|) + abs. */
export function close(a: number, b: number, rel: number, abs = 0): boolean {
  return Math.abs(a - b) <= rel * Math.max(Math.abs(a), Math.abs(b)) + abs;
}
