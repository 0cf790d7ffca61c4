// Demo designs of the fictional Halvorsen Thinfilm Works, built with the optics package from QWOT recipes.
// Textbook structures (Macleod, Thin-Film Optical Filters: quarter-wave stacks, Fabry-Perot cavities,
// quarter-half-quarter AR); the specs are invented for the demo and chosen so the nominal designs pass.
import {
  designFromQwots,
  type Design,
  type ErrorModel,
  type QwotLayer,
  type SpecMask,
} from "@stackproof/optics";

const repeat = (n: number, unit: QwotLayer[]): QwotLayer[] =>
  Array.from({ length: n }, () => unit.map((l) => ({ ...l }))).flat();
const H = (material: string, qwot = 1): QwotLayer => ({ material, qwot });

export interface DemoProgram {
  key: string;
  name: string;
  customer: string;
  application: string;
  description: string;
  protective: boolean;
  targetYield: number;
  mask: SpecMask;
  errorModel: ErrorModel;
  /** The program's minimum evidence trials (the demo's evidence runs use exactly this many). */
  trials: number;
  designName: string;
  /** Revisions in order; the last one is the current candidate. */
  revisions: { stack: Design; note: string }[];
}

/** 1 σ random thickness error as a percentage, plus a small absolute floor (nm). */
const process = (relativePct: number, absoluteNm = 0.3): ErrorModel => ({
  thickness: { relativePct, absoluteNm, distribution: "normal", truncateSigma: 3 },
});

/** Fabry-Perot bandpass: substrate | (HL)^m 2H (LH)^m | air, one full-wave... high-index cavity. */
function bandpass905(pairs: number, cavityQwot: number, name: string): Design {
  const mirror = repeat(pairs, [H("Ta2O5"), H("SiO2")]);
  const mirror2 = repeat(pairs, [H("SiO2"), H("Ta2O5")]);
  return designFromQwots({
    name,
    referenceWavelength: 905,
    layers: [...mirror, H("Ta2O5", cavityQwot), ...mirror2],
    substrate: { material: "fused-silica", thicknessMm: 1.1, backside: false },
  });
}

/** Long-wave-pass edge at 45°: (0.5L H 0.5L)^n, reflecting the excitation band and passing the emission. */
function dichroic(periods: number, lambda0: number, name: string): Design {
  const layers: QwotLayer[] = [];
  for (let i = 0; i < periods; i++) layers.push(H("SiO2", 0.5), H("TiO2"), H("SiO2", 0.5));
  // merge adjacent half-layers of SiO2 into full quarter waves
  const merged: QwotLayer[] = [];
  for (const l of layers) {
    const last = merged[merged.length - 1];
    if (last && last.material === l.material) last.qwot += l.qwot;
    else merged.push({ ...l });
  }
  return designFromQwots({
    name,
    referenceWavelength: lambda0,
    layers: merged,
    substrate: { material: "fused-silica", thicknessMm: 1, backside: false },
  });
}

/** Quarter-half-quarter broadband AR: substrate | M (λ/4) | H (λ/2) | L (λ/4) | air. */
function qhqAr(name: string, h = 2, m = 1, l = 1): Design {
  return designFromQwots({
    name,
    referenceWavelength: 530,
    layers: [H("Al2O3", m), H("ZrO2", h), H("MgF2", l)],
    substrate: { material: "boro-crown", thicknessMm: 2, backside: false },
  });
}

/** Single quarter-wave MgF2 layer (Macleod, single-layer AR: about 1.3 % on crown glass at λ0). */
function singleMgF2(name: string): Design {
  return designFromQwots({
    name,
    referenceWavelength: 550,
    layers: [H("MgF2")],
    substrate: { material: "boro-crown", thicknessMm: 2, backside: false },
  });
}

/** Quarter-wave reflector notch: (HL)^n H at 532 nm. */
function notch532(pairs: number, name: string): Design {
  return designFromQwots({
    name,
    referenceWavelength: 532,
    layers: [...repeat(pairs, [H("Ta2O5"), H("SiO2")]), H("Ta2O5")],
    substrate: { material: "boro-crown", thicknessMm: 3, backside: false },
  });
}

const band = (
  id: string,
  label: string,
  start: number,
  stop: number,
  step: number,
  quantity: "R" | "T" | "OD",
  angleDeg: number,
  requirement: "min" | "max" | "avgMin" | "avgMax",
  value: number,
) => ({ id, label, start, stop, step, quantity, polarization: "u" as const, angleDeg, requirement, value });

export function demoPrograms(): DemoProgram[] {
  return [
    {
      key: "kestrel",
      name: "Kestrel range sensor — 905 nm NIR bandpass",
      customer: "Halvorsen sensing group (internal)",
      application: "Receiver filter of a pulsed 905 nm range finder",
      description:
        "Pass the 905 nm laser return; block ambient light on both sides inside the mirror stop band.",
      protective: false,
      targetYield: 0.85,
      mask: {
        bands: [
          band("pass", "Laser line", 904, 906, 0.5, "T", 0, "min", 50),
          band("block-short", "Short-side blocking", 820, 850, 2, "T", 0, "max", 1),
          band("block-long", "Long-side blocking", 960, 990, 2, "T", 0, "max", 1),
        ],
      },
      errorModel: process(0.3, 0.2),
      trials: 1000,
      designName: "Kestrel receiver bandpass",
      revisions: [
        {
          stack: bandpass905(4, 2, "Kestrel receiver bandpass"),
          note: "First cut: 4-pair Ta2O5/SiO2 mirrors around a half-wave Ta2O5 cavity.",
        },
        {
          stack: bandpass905(5, 2, "Kestrel receiver bandpass"),
          note: "Fifth mirror pair on each side for the blocking bands.",
        },
      ],
    },
    {
      key: "aster",
      name: "Aster fluorescence module — 505 nm dichroic beamsplitter",
      customer: "Aster imaging line",
      application: "45° dichroic: reflect the 440–485 nm excitation, pass the 530–620 nm emission",
      description: "Long-wave-pass edge used at 45° in the filter cube; unpolarized light.",
      protective: false,
      targetYield: 0.9,
      mask: {
        bands: [
          band("reflect", "Excitation reflection", 440, 485, 2, "R", 45, "avgMin", 90),
          band("transmit", "Emission transmission", 530, 620, 2, "T", 45, "avgMin", 75),
        ],
      },
      errorModel: process(0.5),
      trials: 1000,
      designName: "Aster 505 long-pass dichroic",
      revisions: [
        {
          stack: dichroic(8, 450, "Aster 505 long-pass dichroic"),
          note: "Eight (0.5L H 0.5L) periods of TiO2/SiO2 centred at 450 nm.",
        },
        {
          stack: dichroic(10, 452, "Aster 505 long-pass dichroic"),
          note: "Ten periods, centre moved to 452 nm for a steeper edge.",
        },
      ],
    },
    {
      key: "wren",
      name: "Wren camera window — 420–680 nm broadband AR",
      customer: "Wren outdoor camera",
      application: "Anti-reflection coating on both faces of a borosilicate camera window (per surface)",
      description: "Quarter-half-quarter AR; the spec is per coated surface (back surface not counted).",
      protective: false,
      targetYield: 0.9,
      mask: {
        bands: [
          band("average", "Visible average", 420, 680, 5, "R", 0, "avgMax", 0.5),
          band("peak", "Visible peak", 420, 680, 5, "R", 0, "max", 1.5),
        ],
      },
      errorModel: process(1),
      trials: 1000,
      designName: "Wren window AR",
      revisions: [
        { stack: singleMgF2("Wren window AR"), note: "Baseline: one MgF2 quarter wave at 550 nm." },
        {
          stack: qhqAr("Wren window AR", 2, 1, 1),
          note: "Al2O3 / ZrO2 / MgF2 quarter-half-quarter at 530 nm.",
        },
      ],
    },
    {
      key: "merlin",
      name: "Merlin laser shield — 532 nm notch, OD ≥ 4",
      customer: "Merlin lab safety",
      application: "Eye-protection viewing window against 532 nm laser light",
      description:
        "Block 528–536 nm with OD ≥ 4 while keeping blue and red visible. Protective: computed results are no certification.",
      protective: true,
      targetYield: 0.95,
      mask: {
        bands: [
          band("od", "Laser blocking", 528, 536, 1, "OD", 0, "min", 4),
          band("blue", "Blue transmission", 420, 460, 2, "T", 0, "avgMin", 70),
          band("red", "Red transmission", 640, 700, 2, "T", 0, "avgMin", 70),
        ],
      },
      errorModel: process(0.5),
      trials: 2000,
      designName: "Merlin 532 notch",
      revisions: [
        {
          stack: notch532(14, "Merlin 532 notch"),
          note: "(HL)^14 H Ta2O5/SiO2 quarter-wave reflector at 532 nm.",
        },
        { stack: notch532(16, "Merlin 532 notch"), note: "Two more pairs for OD margin at the band edges." },
      ],
    },
  ];
}
