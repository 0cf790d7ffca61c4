// The study of bench/spec-conditions.ts, browser-safe (no node: imports) so the browser benchmark can use it.
import { designFromQwots } from "../src/core/index.ts";
import type { YieldStudy } from "../src/studies/index.ts";

const pairs = (n: number, a: string, b: string) =>
  Array.from({ length: 2 * n }, (_, i) => ({ material: i % 2 ? b : a, qwot: 1 }));

/** Two-cavity Ta2O5/SiO2 bandpass at 1064 nm: [(HL)^3 H 2L H (LH)^3] L [same], 31 layers, on fused silica. */
export function conditionsStudy(trials: number, indexErrors = true): YieldStudy {
  const cavity = [...pairs(3, "Ta2O5", "SiO2"), { material: "Ta2O5", qwot: 1 }, { material: "SiO2", qwot: 2 }, { material: "Ta2O5", qwot: 1 }, ...pairs(3, "SiO2", "Ta2O5")];
  const design = designFromQwots({
    name: "bench bandpass 1064",
    referenceWavelength: 1064,
    layers: [...cavity, { material: "SiO2", qwot: 1 }, ...cavity],
    substrate: { material: "fused-silica", thicknessMm: 1, backside: false },
  });
  return {
    design,
    mask: {
      bands: [
        // passband centre in the lens's f/2 cone, unpolarized, average transmittance
        { id: "pass-f2", start: 1062, stop: 1066, step: 0.5, quantity: "T", polarization: "u", cone: { fNumber: 2 }, requirement: "avgMin", value: 70 },
        // blocking either side over 0–10°, every angle, unpolarized
        { id: "block-lo", start: 1000, stop: 1040, quantity: "T", polarization: "u", angleRange: { fromDeg: 0, toDeg: 10 }, requirement: "max", value: 5 },
        { id: "block-hi", start: 1090, stop: 1130, quantity: "T", polarization: "u", angleRange: { fromDeg: 0, toDeg: 10 }, requirement: "max", value: 5 },
      ],
    },
    errorModel: indexErrors
      ? { thickness: { relativePct: 0.3, absoluteNm: 0.1, distribution: "normal" }, systematicPct: 0.2, indexDriftPct: 0.2 }
      : { thickness: { relativePct: 0.3, absoluteNm: 0.1, distribution: "normal" }, systematicPct: 0.2 },
    trials,
    seed: "bench-conditions",
    envelopeSamples: 200,
  };
}

