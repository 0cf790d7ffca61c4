// The chart's band curves and violation marks come from the verdict's own evaluation; R/T against angle;
// ISO 9211 style wording; CSV export.
import { describe, expect, it } from "vitest";
import { computeSpectrum, createLiveSpectrum, evenGrid } from "../../src/core/index.ts";
import { angleScan, bandView, describeBandIso, evaluateSpec, spectrumToCsv } from "../../src/studies/index.ts";
import type { SpecBandInput } from "../../src/studies/index.ts";
import { qwotDesign } from "./fixtures.ts";

const pairs = (n: number, a: string, b: string): [string, number][] =>
  Array.from({ length: 2 * n }, (_, i) => [i % 2 ? b : a, 1] as [string, number]);
const bandpass = qwotDesign([...pairs(5, "H230", "L138"), ["H230", 2], ...pairs(5, "L138", "H230")], 900);

const band = (over: Partial<SpecBandInput>): SpecBandInput => ({
  id: "b",
  start: 550,
  stop: 550,
  quantity: "R",
  polarization: "u",
  requirement: "max",
  value: 5,
  ...over,
});

describe("bandView", () => {
  it("violation marks are exactly the failing samples of the verdict (p-polarized 20° band)", () => {
    const b = band({ id: "pass", start: 895, stop: 905, step: 0.5, quantity: "T", polarization: "p", angleDeg: 20, requirement: "min", value: 50 });
    const v = bandView(bandpass, { bands: [b] }, "pass");
    const verdict = evaluateSpec(bandpass, { bands: [b] }).bands[0]!;
    expect(v.outcome.pass).toBe(verdict.pass);
    expect(v.outcome.pass).toBe(false); // at 20° the passband has left 895–905 nm
    expect(v.violations.length).toBeGreaterThan(0);
    expect(v.violations.some((x) => x.wavelength === verdict.worst.wavelength && x.value === verdict.worst.value)).toBe(true);
    for (const x of v.violations) expect(x.value).toBeLessThan(50);
    // the displayed curve at the band's own samples is the judged curve
    expect(v.wavelengths).toHaveLength(21);
    const k = v.wavelengths.indexOf(verdict.worst.wavelength);
    expect(v.curves[0]!.values[k]).toBeCloseTo(verdict.worst.value, 10);
    expect(v.title).toBe("pass: T at 20°, p-polarized");
  });

  it("an angle range shows its envelope per polarization; the lowest side holds the verdict's worst point", () => {
    const b = band({ id: "r", start: 890, stop: 902, step: 1, quantity: "T", polarization: "sp", angleRange: { fromDeg: 0, toDeg: 10 }, requirement: "min", value: 1 });
    const v = bandView(bandpass, { bands: [b] }, "r", { start: 880, stop: 910, points: 31 });
    expect(v.curves.map((c) => c.label)).toEqual([
      "lowest over 0–10°, s",
      "highest over 0–10°, s",
      "lowest over 0–10°, p",
      "highest over 0–10°, p",
    ]);
    for (let i = 0; i < 31; i++) {
      expect(v.curves[0]!.values[i]!).toBeLessThanOrEqual(v.curves[1]!.values[i]! + 1e-12);
      expect(v.curves[2]!.values[i]!).toBeLessThanOrEqual(v.curves[3]!.values[i]! + 1e-12);
    }
    const w = v.outcome.worst;
    const side = v.curves[w.polarization === "s" ? 0 : 2]!;
    const i = v.wavelengths.findIndex((x) => Math.abs(x - w.wavelength) < 1e-9);
    expect(side.values[i]).toBeCloseTo(w.value, 8);
  });
});

describe("angleScan", () => {
  it("p reflectance of bare glass vanishes at Brewster's angle atan(1.52) (Hecht, Optics)", () => {
    const glass = qwotDesign([]);
    const brewster = (Math.atan(1.52) * 180) / Math.PI;
    const scan = angleScan(glass, 550, brewster - 1, brewster + 1, 3);
    expect(scan.p.R[1]).toBeLessThan(1e-20);
    expect(scan.p.R[0]).toBeGreaterThan(1e-6);
    expect(scan.s.R[1]! + scan.s.T[1]!).toBeCloseTo(1, 12); // lossless: R + T = 1
    expect(scan.u.R[1]).toBeCloseTo(scan.s.R[1]! / 2, 14);
  });
});

describe("describeBandIso", () => {
  it("states quantity, wavelength range, angle or cone, polarization and requirement", () => {
    expect(describeBandIso(band({ start: 1062, stop: 1066, quantity: "T", requirement: "avgMin", value: 90, cone: { fNumber: 2 } }))).toBe(
      "Transmittance: Tave ≥ 90 % over 1062–1066 nm; cone f/2 (half-angle 14.478°) about 0°; unpolarized",
    );
    expect(
      describeBandIso(band({ start: 400, stop: 700, polarization: "sp", angleRange: { fromDeg: 0, toDeg: 30 }, value: 0.5, tolerance: 0.1 })),
    ).toBe("Reflectance: R ≤ 0.5 % (tolerance 0.1 %) at every wavelength over 400–700 nm; angle of incidence 0–30° (every angle); s and p polarization each");
    expect(describeBandIso(band({ quantity: "OD", requirement: "min", value: 4, angleDeg: 12 }))).toBe(
      "Optical density: OD ≥ 4 at every wavelength at 550 nm; angle of incidence 12°; unpolarized",
    );
  });
});

describe("spectrumToCsv", () => {
  it("writes a header and one line per wavelength; formula-leading cells are neutralised", () => {
    const csv = spectrumToCsv([500, 501], { "T %": [90.5, Number.NaN], "=cmd": [1, 2] });
    expect(csv).toBe("wavelength_nm,T %,'=cmd\n500,90.5,1\n501,,2\n");
    expect(() => spectrumToCsv([500], { R: [1, 2] })).toThrow(RangeError);
  });
});

describe("createLiveSpectrum (the chart's engine)", () => {
  it("gives computeSpectrum's collimated and cone-averaged results (one cone implementation)", () => {
    const wl = evenGrid(895, 905, 21);
    const t = Float64Array.from(bandpass.layers, (l) => l.thickness);
    for (const [pol, cone] of [["u", undefined], ["p", undefined], ["s", { fNumber: 2 }], ["u", { halfAngleDeg: 8 }]] as const) {
      const live = createLiveSpectrum(bandpass, { wavelengths: wl, angleDeg: 5, polarization: pol, cone });
      const ref = computeSpectrum(bandpass, { wavelengths: wl, angleDeg: 5, ...(cone ? { cone } : {}) });
      const got = live.compute(t);
      const want = pol === "u" ? ref.u : ref[pol];
      for (let i = 0; i < wl.length; i++) {
        expect(got.T[i]).toBeCloseTo(want.T[i]!, 12);
        expect(got.R[i]).toBeCloseTo(want.R[i]!, 12);
      }
    }
  });
});
