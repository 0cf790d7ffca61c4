// Starter stacks for a new design, built from the program's spec mask: all written in QWOT at λ0.
import { designFromQwots } from "@stackproof/optics";
import type { Design, SpecMask } from "@stackproof/optics";

export interface Starter {
  id: string;
  name: string;
  description: string;
  build: (name: string, referenceWavelength: number) => Design;
}

const substrate = { material: "boro-crown", thicknessMm: 1, backside: true };

export const STARTERS: Starter[] = [
  {
    id: "bare",
    name: "Bare substrate",
    description: "No layers; add them by hand.",
    build: (name, ref) => designFromQwots({ name, referenceWavelength: ref, layers: [], substrate }),
  },
  {
    id: "single-ar",
    name: "Single-layer antireflection",
    description: "One quarter wave of MgF2.",
    build: (name, ref) => designFromQwots({ name, referenceWavelength: ref, layers: [{ material: "MgF2", qwot: 1 }], substrate }),
  },
  {
    id: "two-layer-ar",
    name: "Quarter–half antireflection",
    description: "Al2O3 (1 QWOT) under ZrO2 (2 QWOT) under MgF2 (1 QWOT).",
    build: (name, ref) =>
      designFromQwots({
        name,
        referenceWavelength: ref,
        layers: [
          { material: "Al2O3", qwot: 1 },
          { material: "ZrO2", qwot: 2 },
          { material: "MgF2", qwot: 1 },
        ],
        substrate,
      }),
  },
  {
    id: "mirror",
    name: "Quarter-wave mirror (HL)⁸H",
    description: "17 alternating Ta2O5 / SiO2 quarter waves centred on λ0.",
    build: (name, ref) =>
      designFromQwots({
        name,
        referenceWavelength: ref,
        layers: Array.from({ length: 17 }, (_, i) => ({ material: i % 2 === 0 ? "Ta2O5" : "SiO2", qwot: 1 })),
        substrate,
      }),
  },
  {
    id: "edge",
    name: "Edge filter (0.5L H 0.5L)⁸",
    description: "A symmetric-period long/short-pass start; shift λ0 to place the edge.",
    build: (name, ref) =>
      designFromQwots({
        name,
        referenceWavelength: ref,
        layers: Array.from({ length: 8 }).flatMap(() => [
          { material: "SiO2", qwot: 0.5 },
          { material: "Nb2O5", qwot: 1 },
          { material: "SiO2", qwot: 0.5 },
        ]),
        substrate,
      }),
  },
];

/** A reference wavelength for the mask: the middle of its bands, rounded to 10 nm. */
export function maskReferenceWavelength(mask: SpecMask | null | undefined): number {
  const bands = mask?.bands ?? [];
  if (bands.length === 0) return 550;
  const lo = Math.min(...bands.map((b) => b.start));
  const hi = Math.max(...bands.map((b) => b.stop));
  return Math.round((lo + hi) / 20) * 10;
}
