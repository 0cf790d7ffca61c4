// Colour of reflected and transmitted light (CIE 015:2018), colour requirements, CIEDE2000.
import { describe, expect, it } from "vitest";
import {
  COLOUR_WAVELENGTHS,
  ColourRequirementSchema,
  colourFromSamples,
  colourOfDesign,
  colourOfSpectrum,
  colourSwatch,
  deltaE,
  designFromQwots,
  evaluateColourRequirement,
  parseDesign,
} from "../../src/core/index.ts";
import { constant, expectClose } from "./helpers.ts";

const flat = (v: number) => new Float64Array(81).fill(v);

describe("white points and the perfect reflector", () => {
  it("D65, 2°: x = 0.3127, y = 0.3290; perfect reflector L*a*b* = (100, 0, 0) (CIE 15:2004)", () => {
    const c = colourFromSamples(flat(1), { illuminant: "D65", observer: "2" });
    expect(c.x).toBeCloseTo(0.3127, 4);
    expect(c.y).toBeCloseTo(0.329, 4);
    expectClose(c.Y, 100, 1e-12);
    expectClose(c.L, 100, 1e-9);
    expect(Math.abs(c.a)).toBeLessThan(1e-9);
    expect(Math.abs(c.b)).toBeLessThan(1e-9);
  });

  it("D65, 10°: x = 0.3138, y = 0.3310 (CIE 15:2004)", () => {
    const c = colourFromSamples(flat(1), { illuminant: "D65", observer: "10" });
    expect(c.x).toBeCloseTo(0.3138, 4);
    expect(c.y).toBeCloseTo(0.331, 4);
  });

  it("illuminant A, 2°: x = 0.4476, y = 0.4074 (CIE 15:2004)", () => {
    const c = colourFromSamples(flat(1), { illuminant: "A", observer: "2" });
    expect(c.x).toBeCloseTo(0.4476, 4);
    expect(c.y).toBeCloseTo(0.4074, 4);
    // the perfect reflector is white under its own illuminant: (100, 0, 0)
    expectClose(c.L, 100, 1e-9);
    expect(Math.abs(c.a) + Math.abs(c.b)).toBeLessThan(1e-9);
  });

  it("the colour-matching functions have equal integrals: equal-energy white ≈ (1/3, 1/3) (CIE 015)", () => {
    // weight an equal-energy spectrum through the D65 weights: divide the stimulus by S(λ)
    // is not needed: equal integrals of x̄, ȳ, z̄ show up directly in the table sums
    const c = colourOfSpectrum([380, 780], [1, 1], { illuminant: "D65" });
    expect(c.warnings).toEqual([]);
    expect(c.Y).toBeCloseTo(100, 9);
  });

  it("a black sample has L* = 0", () => {
    expect(colourFromSamples(flat(0)).L).toBe(0);
  });
});

describe("colour of coated parts", () => {
  it("bare glass n = 1.52 reflects the illuminant's colour: a*, b* ≈ 0, Y = 4.26 % (Fresnel)", () => {
    const glass = parseDesign({
      format: "stackproof.design/v1",
      name: "bare",
      referenceWavelength: 550,
      layers: [],
      substrate: { material: "g", thicknessMm: 1, backside: false },
      materials: [constant("g", 1.52)],
    });
    for (const illuminant of ["D65", "A"] as const) {
      for (const observer of ["2", "10"] as const) {
        const c = colourOfDesign(glass, { quantity: "R", illuminant, observer });
        expect(Math.abs(c.a)).toBeLessThan(1e-9);
        expect(Math.abs(c.b)).toBeLessThan(1e-9);
        // Hecht, Optics: R = ((n − 1)/(n + 1))² = 4.26 %
        expectClose(c.Y, 100 * (0.52 / 2.52) ** 2, 1e-9);
      }
    }
    const white = colourFromSamples(flat(1), { illuminant: "A" });
    const t = colourOfDesign(glass, { quantity: "T", illuminant: "A" });
    expectClose(t.x, white.x, 1e-12);
    expectClose(t.y, white.y, 1e-12);
  });

  it("dispersive crown glass with its back surface stays near neutral (|a*|, |b*| < 1)", () => {
    // dispersion raises R slightly in the blue, so not exactly 0 (common practice, no source)
    const glass = parseDesign({
      format: "stackproof.design/v1",
      name: "bare",
      referenceWavelength: 550,
      layers: [],
      substrate: { material: "boro-crown", thicknessMm: 2, backside: true },
    });
    const c = colourOfDesign(glass, { quantity: "R" });
    expect(Math.abs(c.a)).toBeLessThan(1);
    expect(Math.abs(c.b)).toBeLessThan(1);
  });

  it("a quarter-wave MgF2 AR centred at 550 nm reflects purple: a* > 0, b* < 0", () => {
    // residual reflection rises at both ends of the visible (common practice, no source)
    const ar = designFromQwots({
      name: "ar",
      referenceWavelength: 550,
      layers: [{ material: "MgF2", qwot: 1 }],
      substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
    });
    const c = colourOfDesign(ar, { quantity: "R" });
    expect(c.a).toBeGreaterThan(1);
    expect(c.b).toBeLessThan(-1);
  });

  it("resampling holds end values and warns; too short a spectrum is refused", () => {
    const c = colourOfSpectrum([400, 700], [1, 1]);
    expect(c.warnings[0]).toMatch(/400–700 nm/);
    expect(c.x).toBeCloseTo(0.3127, 4);
    expect(() => colourOfSpectrum([500, 600], [1, 1])).toThrow(/430–700 nm/);
    expect(() => colourOfSpectrum([500, 400], [1, 1])).toThrow(/increase/);
    const bad = flat(0.5);
    bad[20] = Number.NaN;
    expect(() => colourFromSamples(bad)).toThrow(/not finite at 480 nm/);
    expect(COLOUR_WAVELENGTHS[80]).toBe(780);
  });
});

describe("swatch", () => {
  it("the perfect reflector under D65 shows sRGB white; a flat 18 % grey is neutral", () => {
    // sRGB white is D65 (IEC 61966-2-1)
    expect(colourSwatch(colourFromSamples(flat(1)))).toEqual({ hex: "#ffffff", inGamut: true });
    const grey = colourSwatch(colourFromSamples(flat(0.18))).hex;
    expect(grey.slice(1, 3)).toBe(grey.slice(3, 5));
    expect(grey.slice(3, 5)).toBe(grey.slice(5, 7));
    // under A the eye adapts: a flat reflector still shows white
    expect(colourSwatch(colourFromSamples(flat(1), { illuminant: "A" })).hex).toBe("#ffffff");
  });
});

describe("CIEDE2000 (Sharma, Wu & Dalal, Color Res. Appl. 30, 21 (2005), test data; from memory)", () => {
  const rows: [number, number, number, number, number, number, number][] = [
    [50, 2.6772, -79.7751, 50, 0, -82.7485, 2.0425],
    [50, 3.1571, -77.2803, 50, 0, -82.7485, 2.8615],
    [50, 0, 0, 50, -1, 2, 2.3669],
    [50, 2.5, 0, 73, 25, -18, 27.1492],
    [50, 2.5, 0, 61, -5, 29, 22.8977],
    [50, 2.5, 0, 56, -27, -3, 31.903],
    [50, 2.5, 0, 50, 3.1736, 0.5854, 1.0],
    [60.2574, -34.0099, 36.2677, 60.4626, -34.1751, 39.4387, 1.2644],
    [2.0776, 0.0795, -1.135, 0.9033, -0.0636, -0.5514, 0.9082],
  ];
  it.each(rows)("(%f, %f, %f) vs (%f, %f, %f) → %f", (L1, a1, b1, L2, a2, b2, expected) => {
    expect(deltaE("CIEDE2000", { L: L1, a: a1, b: b1 }, { L: L2, a: a2, b: b2 })).toBeCloseTo(expected, 4);
  });
  it("CIE76 is the Euclidean distance in L*a*b* (CIE 015:2018, 8.2.4)", () => {
    expectClose(deltaE("CIE76", { L: 50, a: 0, b: 0 }, { L: 53, a: 4, b: 0 }), 5, 1e-12);
  });
});

describe("colour requirements", () => {
  const ar = designFromQwots({
    name: "ar",
    referenceWavelength: 550,
    layers: [{ material: "MgF2", qwot: 1 }],
    substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
  });

  it("a box in a*/b* passes with a margin and fails with a reason", () => {
    const c = colourOfDesign(ar, { quantity: "R" });
    const pass = evaluateColourRequirement(
      { kind: "colour", quantity: "R", limit: { type: "box-ab", a: [0, 40], b: [-40, 0] } },
      ar,
    );
    expect(pass.pass).toBe(true);
    expectClose(pass.margin, Math.min(c.a, 40 - c.a, c.b + 40, -c.b), 1e-9);
    const fail = evaluateColourRequirement(
      { kind: "colour", quantity: "R", limit: { type: "box-ab", a: [-2, 2], b: [-2, 2] } },
      ar,
    );
    expect(fail.pass).toBe(false);
    expect(fail.margin).toBeLessThan(0);
    expect(fail.reason).toMatch(/outside the box/);
  });

  it("a chromaticity box and a ΔE limit, against coordinates or a design", () => {
    const white = colourFromSamples(flat(1));
    const box = {
      kind: "colour" as const,
      quantity: "T" as const,
      limit: {
        type: "box-xy" as const,
        x: [0.31, 0.315] as [number, number],
        y: [0.325, 0.335] as [number, number],
      },
    };
    expect(evaluateColourRequirement(box, white).pass).toBe(true);
    const dE = evaluateColourRequirement(
      {
        kind: "colour",
        quantity: "R",
        limit: { type: "delta-e", formula: "CIEDE2000", target: { L: 50, a: 0, b: 0 }, max: 1 },
      },
      { ...white, L: 50, a: 2.5, b: 0 },
    );
    expect(dE.pass).toBe(false);
    expect(dE.deltaE).toBeGreaterThan(1);
    expect(dE.reason).toMatch(/ΔE \(CIEDE2000\)/);
  });

  it("a non-finite colour never passes", () => {
    const nan = colourFromSamples(flat(1));
    const v = evaluateColourRequirement(
      { kind: "colour", quantity: "R", limit: { type: "box-ab", a: [-100, 100], b: [-100, 100] } },
      { ...nan, a: Number.NaN },
    );
    expect(v.pass).toBe(false);
    expect(v.reason).toMatch(/not finite/);
  });

  it("the schema refuses inverted boxes and non-positive limits", () => {
    expect(
      ColourRequirementSchema.safeParse({
        kind: "colour",
        quantity: "R",
        limit: { type: "box-xy", x: [0.4, 0.3], y: [0, 1] },
      }).success,
    ).toBe(false);
    expect(
      ColourRequirementSchema.safeParse({
        kind: "colour",
        quantity: "R",
        limit: { type: "delta-e", formula: "CIE76", target: { L: 1, a: 0, b: 0 }, max: 0 },
      }).success,
    ).toBe(false);
    expect(
      ColourRequirementSchema.parse({
        kind: "colour",
        quantity: "T",
        limit: { type: "box-ab", a: [0, 1], b: [0, 1] },
      }),
    ).toMatchObject({
      illuminant: "D65",
      observer: "2",
      angleDeg: 0,
      polarization: "u",
    });
  });
});
