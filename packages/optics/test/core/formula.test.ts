// Formula entry: "(HL)^8 H", "(0.5L H 0.5L)^7", nested groups, column-precise errors.
import { describe, expect, it } from "vitest";
import {
  computeSpectrum,
  designFromFormula,
  getMaterial,
  layerQwots,
  parseFormula,
  refractiveIndex,
} from "../../src/core/index.ts";
import { expectClose } from "./helpers.ts";

const seq = (f: string) =>
  parseFormula(f)
    .map((l) => `${l.qwot}${l.symbol}`)
    .join(" ");

describe("parseFormula", () => {
  it("expands repeats, multipliers and nested groups in deposition order", () => {
    // meaning of QWOT formulas (Macleod, Thin-Film Optical Filters, notation of quarter-wave stacks)
    expect(seq("(HL)^2 H")).toBe("1H 1L 1H 1L 1H");
    expect(seq("(0.5L H 0.5L)^2")).toBe("0.5L 1H 0.5L 0.5L 1H 0.5L");
    expect(seq("2(HL)")).toBe("2H 2L");
    expect(seq("((HL)^2 2H)^2")).toBe("1H 1L 1H 1L 2H 1H 1L 1H 1L 2H");
    expect(seq(" 1.25 M ^3")).toBe("1.25M 1.25M 1.25M");
    expect(seq(".5H")).toBe("0.5H");
    expect(parseFormula("(HL)^8 H")).toHaveLength(17);
    expect(parseFormula("H  L")[1]!.column).toBe(4);
  });

  it("names the column of every error", () => {
    expect(() => parseFormula("(HL^8")).toThrow(/column 6: expected "\)" to close the group/);
    expect(() => parseFormula("HL)")).toThrow(/column 3: unexpected "\)"/);
    expect(() => parseFormula("H ^ L")).toThrow(/column 5: expected a whole number of repeats/);
    expect(() => parseFormula("H*L")).toThrow(/column 2: unexpected "\*"/);
    expect(() => parseFormula("()")).toThrow(/column 1: empty group/);
    expect(() => parseFormula("")).toThrow(/column 1: expected at least one layer/);
    expect(() => parseFormula("0L")).toThrow(/column 1: expected a QWOT multiplier > 0/);
    expect(() => parseFormula("H^0")).toThrow(/column 3: expected at least 1 repeat/);
    expect(() => parseFormula("(HL)^100000")).toThrow(/more than 10000 layers/);
    expect(() => parseFormula("((HL)^100)^100")).toThrow(RangeError);
    expect(() => parseFormula("2.5")).toThrow(/column 4: expected a letter or a group/);
  });
});

describe("designFromFormula", () => {
  it("builds (HL)^8 H at λ0 with quarter waves, and its peak reflectance matches Macleod's formula", () => {
    const design = designFromFormula({
      name: "mirror",
      formula: "(HL)^8 H",
      materials: { H: "Ta2O5", L: "SiO2" }, // lossless Cauchy films, so the lossless formula applies
      referenceWavelength: 633,
      substrate: { material: "fused-silica", thicknessMm: 1, backside: false },
    });
    expect(design.layers).toHaveLength(17);
    for (const q of layerQwots(design)) expectClose(q, 1, 1e-12);
    expect(design.layers[0]!.label).toBe("H");
    // Macleod: R = ((1 − Y)/(1 + Y))², Y = (nH/nL)^(2N) · nH²/ns for (HL)^N H in air
    const n = (id: string) => refractiveIndex(getMaterial(id).model, 633).n;
    const Y = (n("Ta2O5") / n("SiO2")) ** 16 * (n("Ta2O5") ** 2 / n("fused-silica"));
    const R = computeSpectrum(design, { wavelengths: [633] }).u.R[0]!;
    expectClose(R, ((1 - Y) / (1 + Y)) ** 2, 1e-6);
  });

  it("refuses a letter without a material, naming its column", () => {
    expect(() =>
      designFromFormula({
        name: "x",
        formula: "(HL)^2 M",
        materials: { H: "TiO2", L: "SiO2" },
        referenceWavelength: 550,
        substrate: { material: "fused-silica", thicknessMm: 1, backside: false },
      }),
    ).toThrow(/column 8: no material given for letter "M"/);
  });
});
