// The design file format: validation messages and QWOT helpers.
import { readFileSync, readdirSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import {
  computeSpectrum,
  designFromQwots,
  designJsonSchema,
  getMaterial,
  layerQwots,
  parseDesign,
  qwotToThickness,
  refractiveIndex,
  thicknessToQwot,
} from "../../src/core/index.ts";
import { expectClose } from "./helpers.ts";

const good = {
  format: "stackproof.design/v1",
  name: "two layers",
  referenceWavelength: 550,
  layers: [
    { material: "TiO2", thickness: 20 },
    { material: "SiO2", thickness: 30 },
    { material: "TiO2", thickness: 110 },
    { material: "SiO2", thickness: 90 },
  ],
  substrate: { material: "boro-crown", thicknessMm: 1, backside: true },
};

describe("parseDesign", () => {
  it("accepts a valid design and fills the default media", () => {
    const d = parseDesign(good);
    expect(d.incident).toBe("air");
    expect(d.exit).toBe("air");
  });

  it("names the field path and the offending value", () => {
    const bad = structuredClone(good);
    bad.layers[3]!.thickness = -5;
    expect(() => parseDesign(bad)).toThrow(RangeError);
    expect(() => parseDesign(bad)).toThrow("layers[3].thickness: expected a number ≥ 0, got -5");
    const bad2 = { ...good, referenceWavelength: "550" };
    expect(() => parseDesign(bad2)).toThrow(/^referenceWavelength: .*got "550"/);
    const bad3 = { ...good, format: "other/v9" };
    expect(() => parseDesign(bad3)).toThrow(/^format: .*got "other\/v9"/);
    const bad4 = { ...good, substrate: { material: "boro-crown", thicknessMm: 1 } };
    expect(() => parseDesign(bad4)).toThrow(/^substrate\.backside: .*got nothing/);
  });

  it("checks that every material id resolves", () => {
    const bad = structuredClone(good);
    bad.layers[1]!.material = "SiO3";
    expect(() => parseDesign(bad)).toThrow('layers[1].material: unknown material id, got "SiO3"');
    const local = {
      ...bad,
      materials: [{ id: "SiO3", name: "local", model: { kind: "constant", n: 1.5 }, role: "layer", source: "measured" }],
    };
    expect(parseDesign(local).materials?.[0]?.id).toBe("SiO3");
  });
});

describe("QWOT helpers", () => {
  it("QWOT = 4 n d / λ0 and back", () => {
    // definition of quarter-wave optical thickness (Macleod)
    expectClose(qwotToThickness(1, 1.38, 550), 550 / (4 * 1.38), 1e-15);
    expectClose(thicknessToQwot(qwotToThickness(2.4, 2.1, 633), 2.1, 633), 2.4, 1e-14);
  });

  it("designFromQwots and layerQwots round-trip with dispersive materials", () => {
    const d = designFromQwots({
      name: "QW mirror",
      referenceWavelength: 633,
      layers: [
        { material: "TiO2", qwot: 1 },
        { material: "SiO2", qwot: 1 },
        { material: "TiO2", qwot: 2, label: "spacer" },
      ],
      substrate: { material: "fused-silica", thicknessMm: 3, backside: true },
    });
    const q = layerQwots(d);
    expectClose(q[0]!, 1, 1e-13);
    expectClose(q[2]!, 2, 1e-13);
    expectClose(d.layers[1]!.thickness, 633 / (4 * refractiveIndex(getMaterial("SiO2").model, 633).n), 1e-14);
    expect(d.layers[2]!.label).toBe("spacer");
  });
});

describe("example files", () => {
  const dir = join(dirname(fileURLToPath(import.meta.url)), "../../docs/examples");
  // only design files (the folder also holds study files that embed a design)
  const files = readdirSync(dir).filter(
    (f) => f.endsWith(".json") && (JSON.parse(readFileSync(join(dir, f), "utf8")) as { format?: unknown }).format === "stackproof.design/v1",
  );
  it("there are example designs", () => expect(files.length).toBeGreaterThanOrEqual(4));
  for (const f of files) {
    it(`${f} parses and computes`, () => {
      const d = parseDesign(JSON.parse(readFileSync(join(dir, f), "utf8")));
      const lo = d.referenceWavelength * 0.8;
      const sp = computeSpectrum(d, { wavelengths: [lo, d.referenceWavelength, d.referenceWavelength * 1.2] });
      for (const v of sp.u.R) expect(v).toBeGreaterThanOrEqual(0);
    });
  }
});

describe("designJsonSchema", () => {
  it("describes the file format for documentation", () => {
    const s = designJsonSchema() as { properties: Record<string, unknown>; required: string[] };
    expect(Object.keys(s.properties)).toContain("layers");
    expect(s.required).toContain("format");
    expect(s.required).not.toContain("incident");
  });
});
