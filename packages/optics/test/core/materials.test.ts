// Dispersion models and the built-in library.
import { describe, expect, it } from "vitest";
import {
  MATERIAL_LIBRARY,
  MaterialSchema,
  getMaterial,
  indexTable,
  refractiveIndex,
  type MaterialModel,
} from "../../src/core/index.ts";
import { expectClose } from "./helpers.ts";

describe("dispersion models", () => {
  it("fused silica (Malitson Sellmeier) gives n ≈ 1.4585 at 587.6 nm", () => {
    // Malitson, J. Opt. Soc. Am. 55, 1205 (1965): n_d = 1.4585
    const n = refractiveIndex(getMaterial("fused-silica").model, 587.6).n;
    expect(n).toBeCloseTo(1.4585, 4);
  });

  it("sapphire ordinary ray is about 1.768 at 589 nm", () => {
    // Malitson & Dodge (1972), n_o ≈ 1.768 at the sodium D line (from memory)
    expect(refractiveIndex(getMaterial("sapphire").model, 589.3).n).toBeCloseTo(1.768, 2);
  });

  it("borosilicate crown is about 1.5168 at 587.6 nm", () => {
    // catalogue n_d of the standard borosilicate crown (from memory)
    expect(refractiveIndex(getMaterial("boro-crown").model, 587.6).n).toBeCloseTo(1.5168, 4);
  });

  it("Cauchy takes λ in µm: n = A + B/λ² + C/λ⁴", () => {
    // definition of the Cauchy formula (common practice, no source)
    const m: MaterialModel = { kind: "cauchy", A: 1.5, B: 0.01, C: 0.001, k: 0.002 };
    const v = refractiveIndex(m, 500);
    expectClose(v.n, 1.5 + 0.01 / 0.25 + 0.001 / 0.0625, 1e-14);
    expect(v.k).toBe(0.002);
  });

  it("tables interpolate linearly in λ and refuse to extrapolate unless asked", () => {
    // linear interpolation (common practice, no source)
    const m: MaterialModel = { kind: "table", points: [[400, 2, 0.1], [600, 1.8, 0.3]] };
    const v = refractiveIndex(m, 450);
    expectClose(v.n, 1.95, 1e-14);
    expectClose(v.k, 0.15, 1e-14);
    expect(() => refractiveIndex(m, 700)).toThrow(RangeError);
    expect(() => refractiveIndex(m, 700)).toThrow(/700 nm.*400–600 nm/);
    const clamped = refractiveIndex({ ...m, extrapolate: true }, 350);
    expect(clamped).toEqual({ n: 2, k: 0.1, extrapolated: true });
    const t = indexTable({ ...m, extrapolate: true }, [350, 450, 650]);
    expect(t.extrapolated).toBe(2);
  });

  it("a wavelength inside a Sellmeier resonance or ≤ 0 is a RangeError naming it", () => {
    expect(() => refractiveIndex(getMaterial("fused-silica").model, -5)).toThrow(/-5/);
    expect(() => refractiveIndex({ kind: "sellmeier", B: [1], C: [1] }, 900)).toThrow(RangeError);
  });
});

describe("material library", () => {
  it("every entry validates, has a source, and ids are unique", () => {
    const ids = new Set<string>();
    for (const m of MATERIAL_LIBRARY) {
      expect(MaterialSchema.safeParse(m).success).toBe(true);
      expect(m.source.length).toBeGreaterThan(5);
      expect(ids.has(m.id)).toBe(false);
      ids.add(m.id);
    }
    for (const id of ["air", "SiO2", "MgF2", "Al2O3", "HfO2", "ZrO2", "Ta2O5", "Nb2O5", "TiO2", "ZnS", "Ag", "Al", "Au", "Cr",
      "fused-silica", "boro-crown", "sapphire", "silicon", "germanium"]) {
      expect(ids.has(id)).toBe(true);
    }
  });

  it("film indices at 550 nm sit in their usual ranges", () => {
    // typical dense-film values (common practice, no source; from memory)
    const n = (id: string) => refractiveIndex(getMaterial(id).model, 550).n;
    expect(n("MgF2")).toBeCloseTo(1.38, 2);
    expect(n("SiO2")).toBeGreaterThan(1.44);
    expect(n("SiO2")).toBeLessThan(1.48);
    expect(n("TiO2")).toBeGreaterThan(2.3);
    expect(n("Ta2O5")).toBeGreaterThan(2.05);
    expect(refractiveIndex(getMaterial("Ag").model, 550).k).toBeGreaterThan(3);
  });

  it("custom materials override the library; unknown ids are a RangeError naming the id", () => {
    const mine = { id: "SiO2", name: "my silica", model: { kind: "constant" as const, n: 1.47, k: 0 }, role: "layer" as const, source: "measured" };
    expect(getMaterial("SiO2", [mine]).name).toBe("my silica");
    expect(() => getMaterial("unobtainium")).toThrow(/unobtainium/);
  });
});
