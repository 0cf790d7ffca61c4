import { describe, expect, it } from "vitest";
import {
  bandLimit,
  evaluateBandOnArrays,
  bandWavelengths,
  createSpecEvaluator,
  evaluateSpec,
  parseSpecMask,
  PROTECTIVE_CAUTION,
  quantityValue,
} from "../../src/studies/index.ts";
import type { SpecBand, SpecMask } from "../../src/studies/index.ts";
import { qwotDesign } from "./fixtures.ts";

const band = (over: Partial<SpecBand>): SpecBand => ({
  id: "b",
  start: 550,
  stop: 550,
  quantity: "R",
  polarization: "u",
  angleDeg: 0,
  requirement: "max",
  value: 5,
  ...over,
});

// Bare glass n = 1.52 in air, front surface only: R = ((1.52 − 1)/(1.52 + 1))² = 4.2578 % (Hecht, Optics, Fresnel equations).
const R_GLASS = ((1.52 - 1) / (1.52 + 1)) ** 2 * 100;
// Quarter-wave n = 1.38 on 1.52 at λ0: R = ((1.52 − 1.38²)/(1.52 + 1.38²))² = 1.2601 % (Macleod, Thin-Film Optical Filters, single-layer AR).
const R_QW = ((1.52 - 1.38 ** 2) / (1.52 + 1.38 ** 2)) ** 2 * 100;

describe("band sampling and units", () => {
  it("samples start..stop with the step, always including stop", () => {
    expect(bandWavelengths({ start: 400, stop: 410, step: 2.5 })).toEqual([400, 402.5, 405, 407.5, 410]);
    expect(bandWavelengths({ start: 400, stop: 409, step: 2 })).toEqual([400, 402, 404, 406, 408, 409]);
    expect(bandWavelengths({ start: 500, stop: 500 })).toEqual([500]);
    expect(bandWavelengths({ start: 400, stop: 700 })).toHaveLength(301); // default 1 nm
    const wide = bandWavelengths({ start: 400, stop: 2000 });
    expect(wide).toHaveLength(501);
    expect(wide[500]).toBe(2000);
  });

  it("converts fractions to percent and T to OD = −log10 T (definition of optical density)", () => {
    expect(quantityValue("R", 0.042, 0.958, 0)).toBeCloseTo(4.2, 12);
    expect(quantityValue("OD", 0, 1e-3, 0)).toBeCloseTo(3, 12);
    expect(quantityValue("OD", 0, 0, 0)).toBe(30);
  });

  it("tolerance relaxes the limit in both directions", () => {
    expect(bandLimit({ requirement: "max", value: 1, tolerance: 0.2 })).toBeCloseTo(1.2, 12);
    expect(bandLimit({ requirement: "avgMin", value: 90, tolerance: 1 })).toBe(89);
  });
});

describe("evaluateSpec on hand-checked designs", () => {
  it("bare glass: R = 4.26 % passes R ≤ 5 % with margin 0.74 and fails R ≤ 4 %", () => {
    const design = qwotDesign([]);
    const ok = evaluateSpec(design, { bands: [band({ id: "r5", start: 500, stop: 600, step: 10 })] });
    expect(ok.pass).toBe(true);
    expect(ok.bands[0]?.margin).toBeCloseTo(5 - R_GLASS, 6);
    expect(ok.bands[0]?.average).toBeCloseTo(R_GLASS, 6);
    expect(ok.merit).toBe(0);
    const bad = evaluateSpec(design, { bands: [band({ id: "r4", value: 4 })] });
    expect(bad.pass).toBe(false);
    expect(bad.bands[0]?.margin).toBeCloseTo(4 - R_GLASS, 6);
    // merit = mean squared violation (one sample) = (R − 4)²
    expect(bad.merit).toBeCloseTo((R_GLASS - 4) ** 2, 6);
    // T min on bare glass: T = 1 − R (lossless, single surface; energy conservation)
    const t = evaluateSpec(design, {
      bands: [band({ id: "t", quantity: "T", requirement: "min", value: 95 })],
    });
    expect(t.bands[0]?.margin).toBeCloseTo(100 - R_GLASS - 95, 6);
  });

  it("quarter-wave MgF2-like layer: worst point of R at λ0 is 1.26 % and the band minimum sits at λ0", () => {
    const design = qwotDesign([["L138", 1]]);
    const res = evaluateSpec(design, {
      bands: [
        band({ id: "at-l0", value: 1.3 }),
        band({ id: "min-near-l0", start: 500, stop: 600, step: 1, requirement: "min", value: 1 }),
      ],
    });
    expect(res.bands[0]?.worst.value).toBeCloseTo(R_QW, 6);
    expect(res.bands[0]?.margin).toBeCloseTo(1.3 - R_QW, 6);
    // For a single quarter-wave layer with n1² > ns·n0 the reflectance minimum is at λ0 (Macleod).
    expect(res.bands[1]?.worst.wavelength).toBe(550);
    expect(res.bands[1]?.worst.value).toBeCloseTo(R_QW, 6);
    expect(res.pass).toBe(true);
  });

  it("half-wave layer is absent at λ0: R equals bare glass (Macleod, absentee layer)", () => {
    const res = evaluateSpec(qwotDesign([["H230", 2]]), {
      bands: [band({ id: "hw", requirement: "avgMax", value: 4.3 })],
    });
    expect(res.bands[0]?.average).toBeCloseTo(R_GLASS, 6);
    expect(res.bands[0]?.margin).toBeCloseTo(4.3 - R_GLASS, 6);
  });

  it("average requirements use the band mean; min/max use the worst sample", () => {
    const design = qwotDesign([["L138", 1]]);
    const mask: SpecMask = {
      bands: [
        band({ id: "avg", start: 450, stop: 650, step: 50, requirement: "avgMax", value: 2 }),
        band({ id: "max", start: 450, stop: 650, step: 50, requirement: "max", value: 2 }),
      ],
    };
    const ev = createSpecEvaluator(design, mask);
    const values = new Float64Array(5);
    const out = ev.evaluate(ev.nominalThicknesses);
    ev.bandValues(0, values);
    const mean = values.reduce((s, v) => s + v, 0) / 5;
    expect(out[0]?.average).toBeCloseTo(mean, 12);
    expect(out[0]?.margin).toBeCloseTo(2 - mean, 12);
    expect(out[1]?.margin).toBeCloseTo(2 - Math.max(...values), 12);
    expect(ev.groups).toHaveLength(1); // same angle and polarization → one evaluator
  });

  it("groups bands by angle and polarization, over the union of their samples", () => {
    const mask: SpecMask = {
      bands: [
        band({ id: "a", start: 500, stop: 520, step: 10 }),
        band({ id: "b", start: 510, stop: 530, step: 5 }),
        band({ id: "c", start: 500, stop: 520, step: 10, angleDeg: 45, polarization: "s" }),
      ],
    };
    const ev = createSpecEvaluator(qwotDesign([["L138", 1]]), mask);
    expect(ev.groups).toHaveLength(2);
    expect(Array.from(ev.groups[0]?.wavelengths ?? [])).toEqual([500, 510, 515, 520, 525, 530]);
    expect(ev.residualCount).toBe(3 + 5 + 3);
  });

  it("s-polarised R of bare glass at 45° follows Fresnel: rs = (cosθ − √(n² − sin²θ))/(cosθ + √(n² − sin²θ)) (Hecht)", () => {
    const c = Math.cos(Math.PI / 4);
    const root = Math.sqrt(1.52 ** 2 - 0.5);
    const rs = ((c - root) / (c + root)) ** 2 * 100;
    const res = evaluateSpec(qwotDesign([]), {
      bands: [band({ id: "s45", polarization: "s", angleDeg: 45, value: 10 })],
    });
    expect(res.bands[0]?.worst.value).toBeCloseTo(rs, 6);
  });

  it("protective masks carry the certification caution", () => {
    const res = evaluateSpec(qwotDesign([]), {
      protective: true,
      bands: [band({ quantity: "OD", requirement: "min", value: 0.01 })],
    });
    expect(res.cautions).toEqual([PROTECTIVE_CAUTION]);
    expect(res.bands[0]?.worst.value).toBeCloseTo(-Math.log10(1 - R_GLASS / 100), 6);
  });

  it("rejects bad masks with a RangeError naming the field and value", () => {
    expect(() => parseSpecMask({ bands: [band({ start: 600, stop: 500 })] })).toThrow(
      /mask\.bands\[0\]\.stop: stop must be ≥ start.*got 500/,
    );
    expect(() => parseSpecMask({ bands: [{ ...band({}), quantity: "X" }] })).toThrow(
      /mask\.bands\[0\]\.quantity.*"X"/,
    );
    expect(() => parseSpecMask({ bands: [band({ angleDeg: 95 })] })).toThrow(/angleDeg.*got 95/);
    expect(() => parseSpecMask({ bands: [band({ id: "x" }), band({ id: "x" })] })).toThrow(
      /bands\[1\]\.id: duplicate band id, got "x"/,
    );
    expect(() => parseSpecMask({ bands: [] })).toThrow(/mask\.bands/);
    expect(() => evaluateSpec(qwotDesign([]), { bands: [band({ step: -1 })] })).toThrow(RangeError);
  });
});

describe("evaluateBandOnArrays (tabulated or measured spectra)", () => {
  // A straight line R = 1 + (λ − 500)/100 % is reproduced exactly by linear interpolation (by construction).
  const wl = [480, 500, 550, 600, 650];
  const R = wl.map((w) => 1 + (w - 500) / 100);

  it("interpolates linearly onto the band samples and applies the requirement", () => {
    const max = evaluateBandOnArrays(band({ id: "m", start: 510, stop: 590, step: 10, value: 2 }), wl, R);
    expect(max.worst.wavelength).toBe(590);
    expect(max.worst.value).toBeCloseTo(1.9, 12);
    expect(max.margin).toBeCloseTo(0.1, 12);
    const avg = evaluateBandOnArrays(
      band({ id: "a", start: 500, stop: 600, step: 25, requirement: "avgMin", value: 1.4 }),
      wl,
      R,
    );
    expect(avg.average).toBeCloseTo(1.5, 12);
    expect(avg.margin).toBeCloseTo(0.1, 12);
    expect(avg.pass).toBe(true);
  });

  it("refuses to extrapolate and rejects unsorted wavelengths", () => {
    expect(() => evaluateBandOnArrays(band({ start: 450, stop: 600 }), wl, R)).toThrow(
      /reaches outside the spectrum \(480–650 nm\)/,
    );
    expect(() => evaluateBandOnArrays(band({}), [500, 490, 600], [1, 1, 1])).toThrow(
      /wavelengths\[1\].*got 490/,
    );
    expect(() => evaluateBandOnArrays(band({}), wl, [1, 2])).toThrow(/expected 5 values/);
  });
});
