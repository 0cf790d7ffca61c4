// A revision that is expensive to evaluate: many layers, many bands, many angles, fine steps.
import { designFromQwots, type Design, type SpecMask } from "@stackproof/optics";

/** 80 alternating quarter-wave layers on glass. */
export function heavyStack(): Design {
  return designFromQwots({
    name: "Heavy stack",
    referenceWavelength: 550,
    layers: Array.from({ length: 80 }, (_, i) => ({
      material: i % 2 ? "MgF2" : "Al2O3",
      qwot: 1 + (i % 5) * 0.01,
    })),
    substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
  });
}

/** `bands` bands of 601 points each (400–700 nm every 0.5 nm), at angles 0°, 3°, 6°, … unpolarized. */
export function heavyMask(bands = 24): SpecMask {
  return {
    bands: Array.from({ length: bands }, (_, i) => ({
      id: `b${i}`,
      start: 400,
      stop: 700,
      step: 0.5,
      quantity: "R" as const,
      polarization: "u" as const,
      angleDeg: i * 3,
      requirement: "max" as const,
      value: 100,
    })),
  };
}
