// Spec bands under customer conditions: angle ranges, cones, angle averages, "s and p each", and
// non-finite values. Each check names its source.
import { describe, expect, it } from "vitest";
import { computeSpectrum } from "../../src/core/index.ts";
import type { Design } from "../../src/core/index.ts";
import {
  ANGLE_RANGE_TOLERANCE_DEG,
  bandConditionsText,
  createSpecEvaluator,
  evaluateSpec,
  parseSpecMask,
} from "../../src/studies/index.ts";
import type { SpecBandInput } from "../../src/studies/index.ts";
import { qwotDesign, TEST_MATERIALS } from "./fixtures.ts";

const pairs = (n: number, a: string, b: string): [string, number][] =>
  Array.from({ length: 2 * n }, (_, i) => [i % 2 ? b : a, 1] as [string, number]);
// (HL)^5 2H (LH)^5 at λ0 = 900 nm: a 1.5 nm-wide bandpass whose passband moves blue with angle.
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

// Fresnel reflectances of bare n = 1.52 glass at 45° in air (Hecht, Optics, Fresnel equations).
function fresnel45(): { Rs: number; Rp: number } {
  const n = 1.52;
  const ci = Math.cos(Math.PI / 4);
  const ct = Math.sqrt(1 - (Math.sin(Math.PI / 4) / n) ** 2);
  const rs = (ci - n * ct) / (ci + n * ct);
  const rp = (n * ci - ct) / (n * ci + ct);
  return { Rs: rs * rs * 100, Rp: rp * rp * 100 };
}

describe("stored masks stay valid", () => {
  it("a band with only angleDeg parses unchanged; angleDeg may be left out (0°)", () => {
    const m = parseSpecMask({ bands: [band({ angleDeg: 12 }), band({ id: "c" })] });
    expect(m.bands[0]?.angleDeg).toBe(12);
    expect(m.bands[1]?.angleDeg).toBe(0);
  });

  it("refuses contradictory conditions with a RangeError naming the field", () => {
    expect(() => parseSpecMask({ bands: [band({ angleRange: { fromDeg: 0, toDeg: 10 }, cone: { fNumber: 2 } })] })).toThrow(/cone/);
    expect(() => parseSpecMask({ bands: [band({ angleAverage: true })] })).toThrow(/angleAverage/);
    expect(() => parseSpecMask({ bands: [band({ angleRange: { fromDeg: 20, toDeg: 10 } })] })).toThrow(/toDeg/);
    expect(() => parseSpecMask({ bands: [band({ angleDeg: 80, cone: { halfAngleDeg: 15 } })] })).toThrow(/grazing/);
  });
});

describe("s and p each", () => {
  // bare glass at 45°: Rs = 9.21 %, Rp = 0.85 % (Hecht, Fresnel equations)
  const glass = qwotDesign([]);
  const { Rs, Rp } = fresnel45();

  it("fails when s fails (R ≤ 5 %) and names s as the worst polarization", () => {
    const r = evaluateSpec(glass, { bands: [band({ angleDeg: 45, polarization: "sp", value: 5 })] });
    expect(r.pass).toBe(false);
    expect(r.bands[0]?.worst.polarization).toBe("s");
    expect(r.bands[0]?.worst.value).toBeCloseTo(Rs, 8);
    expect(r.bands[0]?.worst.angleDeg).toBe(45);
  });

  it("fails when p fails (R ≥ 1 %) and names p", () => {
    const r = evaluateSpec(glass, { bands: [band({ angleDeg: 45, polarization: "sp", requirement: "min", value: 1 })] });
    expect(r.pass).toBe(false);
    expect(r.bands[0]?.worst.polarization).toBe("p");
    expect(r.bands[0]?.worst.value).toBeCloseTo(Rp, 8);
  });

  it("passes only when both pass, while the unpolarized mean alone would pass the same limit", () => {
    const limit = (Rs + Rp) / 2 + 0.1; // the mean passes, s does not
    const u = evaluateSpec(glass, { bands: [band({ angleDeg: 45, polarization: "u", value: limit })] });
    const sp = evaluateSpec(glass, { bands: [band({ angleDeg: 45, polarization: "sp", value: limit })] });
    expect(u.pass).toBe(true);
    expect(sp.pass).toBe(false);
    const both = evaluateSpec(glass, { bands: [band({ angleDeg: 45, polarization: "sp", value: Rs + 0.01 })] });
    expect(both.pass).toBe(true);
  });
});

describe("angle range", () => {
  // Transmittance just below the passband rises to a peak at the angle where the passband has moved onto it:
  // the worst angle of a "T ≤ x" band is inside the range, between samples 2° apart.
  const b = band({
    id: "blue-side",
    start: 896,
    stop: 896,
    quantity: "T",
    polarization: "u",
    requirement: "max",
    value: 1,
    angleRange: { fromDeg: 0, toDeg: 20, stepDeg: 2 },
  });

  it("finds the worst angle of a dense scan (0.005° steps) to within the stated tolerance", () => {
    const r = evaluateSpec(bandpass, { bands: [b] });
    const worst = r.bands[0]!.worst;
    // dense reference scan with the plain spectrum routine
    let best = -Infinity;
    let bestAngle = 0;
    for (let a = 0; a <= 20; a += 0.005) {
      const v = computeSpectrum(bandpass, { wavelengths: [896], angleDeg: a }).u.T[0]! * 100;
      if (v > best) {
        best = v;
        bestAngle = a;
      }
    }
    expect(bestAngle).toBeGreaterThan(2); // the peak is between samples, not at an end
    expect(Math.abs(worst.angleDeg - bestAngle)).toBeLessThanOrEqual(ANGLE_RANGE_TOLERANCE_DEG + 0.005);
    expect(worst.polarization).toBe("u");
    // the value found is a real evaluation (never above the true peak) and close to it
    expect(worst.value).toBeLessThanOrEqual(best + 1e-6);
    expect(best - worst.value).toBeLessThan(0.02 * best);
    // without the search the sampled angles alone miss the peak by far more
    const sampled = Math.max(
      ...Array.from({ length: 11 }, (_, k) => {
        return computeSpectrum(bandpass, { wavelengths: [896], angleDeg: 2 * k }).u.T[0]! * 100;
      }),
    );
    expect(worst.value - sampled).toBeGreaterThan(0.5 * (best - sampled));
  });

  it("evaluate and margins agree on the verdict; the band curve is the worst over angles per wavelength", () => {
    for (const value of [50, 99]) {
      const ev = createSpecEvaluator(bandpass, { bands: [{ ...b, polarization: "sp", stop: 897, value }] });
      const out = new Float64Array(1);
      const t = ev.nominalThicknesses;
      const pass = ev.margins(t, out);
      const outcome = ev.evaluate(t)[0]!;
      expect(pass).toBe(outcome.pass);
      expect(pass).toBe(value === 99);
      // a passing band gets the full search in both; a failing one may stop at the first failing sample
      if (pass) expect(out[0]).toBeCloseTo(outcome.margin, 10);
      else expect(out[0]!).toBeGreaterThanOrEqual(outcome.margin);
    }
    const ev = createSpecEvaluator(bandpass, { bands: [{ ...b, polarization: "sp" }] });
    ev.evaluate(ev.nominalThicknesses);
    const g = ev.groups[ev.bands[0]!.group]!;
    expect(g.conditions).toBe("0–20°, s and p each");
    expect(g.angleAt).toBeDefined();
  });

  it("angle average equals the mean over the range (bare glass, R(θ) from the Fresnel equations, trapezoid 0.01°)", () => {
    const glass = qwotDesign([]);
    const r = evaluateSpec(glass, {
      bands: [band({ polarization: "s", angleRange: { fromDeg: 0, toDeg: 40 }, angleAverage: true, requirement: "avgMax", value: 10 })],
    });
    let sum = 0;
    const K = 4000;
    for (let i = 0; i <= K; i++) {
      const th = ((40 * i) / K) * (Math.PI / 180);
      const ct = Math.sqrt(1 - (Math.sin(th) / 1.52) ** 2);
      const rs = (Math.cos(th) - 1.52 * ct) / (Math.cos(th) + 1.52 * ct);
      sum += (i === 0 || i === K ? 0.5 : 1) * rs * rs * 100;
    }
    expect(r.bands[0]!.average).toBeCloseTo(sum / K, 5);
  });
});

describe("index factors (Monte Carlo drift)", () => {
  it("a band with conditions applies index factors exactly as a plain band does (same method, 1e-10)", () => {
    const simple = band({ id: "a", start: 880, stop: 920, step: 2, quantity: "T", requirement: "max", value: 100, angleDeg: 7, polarization: "u" });
    const withRange = { ...simple, id: "b", angleRange: { fromDeg: 7, toDeg: 7 } };
    const ev = createSpecEvaluator(bandpass, { bands: [simple, withRange] });
    const t = Float64Array.from(ev.nominalThicknesses, (d, j) => d * (1 + 0.01 * Math.sin(j)));
    // per-material drift plus per-layer noise: some layers share a factor, some do not
    const scale = Float64Array.from(t, (_, j) => (j % 2 ? 1.004 : 0.997) * (j % 5 === 0 ? 1.001 : 1));
    const g0 = new Float64Array(21);
    const g1 = new Float64Array(21);
    ev.compute(t, scale);
    ev.bandValues(0, g0);
    ev.bandValues(1, g1);
    for (let i = 0; i < 21; i++) expect(Math.abs(g0[i]! - g1[i]!)).toBeLessThan(1e-10);
    // and back to nominal tables when no factors are given
    ev.compute(t);
    ev.bandValues(0, g0);
    ev.bandValues(1, g1);
    for (let i = 0; i < 21; i++) expect(Math.abs(g0[i]! - g1[i]!)).toBeLessThan(1e-10);
  });
});

describe("cone band", () => {
  it("uses the same cone average as computeSpectrum (one implementation)", () => {
    const wl = [899, 899.5, 900];
    const r = evaluateSpec(bandpass, {
      bands: [band({ start: 899, stop: 900, step: 0.5, quantity: "T", requirement: "min", value: 1, cone: { fNumber: 2 } })],
    });
    const sp = computeSpectrum(bandpass, { wavelengths: wl, cone: { fNumber: 2 } });
    const min = Math.min(...Array.from(sp.u.T)) * 100;
    expect(r.bands[0]!.worst.value).toBeCloseTo(min, 6);
    expect(bandConditionsText(parseSpecMask({ bands: [band({ cone: { fNumber: 2 } })] }).bands[0]!)).toBe(
      "f/2 cone (14.48° half-angle) about 0°, unpolarized",
    );
  });
});

describe("non-finite values fail (never pass)", () => {
  const huge = (over: Partial<Design>): Design => ({ ...qwotDesign([["H230", 1]]), ...over });

  it("a thickness of 1e308 nm makes the spectrum NaN: every band fails with a reason naming the wavelength", () => {
    const d = huge({});
    d.layers = [{ material: "H230", thickness: 1e308 }];
    for (const b of [
      band({ id: "r", start: 532, stop: 532, requirement: "max", value: 100 }),
      band({ id: "od", start: 532, stop: 532, quantity: "OD", requirement: "min", value: 1 }),
      band({ id: "avg", start: 530, stop: 534, quantity: "T", requirement: "avgMax", value: 100 }),
      band({ id: "range", start: 532, stop: 532, requirement: "max", value: 100, angleRange: { fromDeg: 0, toDeg: 10 } }),
    ]) {
      const r = evaluateSpec(d, { bands: [b] });
      expect(r.pass).toBe(false);
      expect(r.bands[0]!.pass).toBe(false);
      expect(r.bands[0]!.reason).toMatch(/the spectrum is not finite at 53\d nm/);
      const ev = createSpecEvaluator(d, { bands: [b] });
      const out = new Float64Array(1);
      expect(ev.margins(ev.nominalThicknesses, out)).toBe(false);
      // the optimizer's merit sees a violation, not a perfect design
      const res = new Float64Array(ev.residualCount);
      ev.residuals(ev.nominalThicknesses, res);
      expect(res.some((v) => v > 0)).toBe(true);
    }
  });

  it("a material with n = 1e308 never passes: refused naming the material, or failing", () => {
    const d = qwotDesign([]);
    d.materials = [...TEST_MATERIALS, { id: "absurd", name: "absurd", model: { kind: "constant", n: 1e308, k: 0 }, role: "layer", source: "test value" }];
    d.layers = [{ material: "absurd", thickness: 100 }];
    let outcome: boolean | string;
    try {
      outcome = evaluateSpec(d, { bands: [band({ start: 532, stop: 532, quantity: "T", requirement: "max", value: 100 })] }).pass;
    } catch (e) {
      expect(e).toBeInstanceOf(RangeError);
      outcome = (e as Error).message;
    }
    if (typeof outcome === "string") expect(outcome).toMatch(/absurd/);
    else expect(outcome).toBe(false);
  });
});

describe("quarter-wave stack peak reflectance", () => {
  it("(HL)^N H at λ0 reflects [(1 − Y)/(1 + Y)]² with Y = (nH/nL)^(2N)·nH²/ns (Macleod, Thin-Film Optical Filters)", () => {
    for (const N of [2, 4, 6]) {
      const d = qwotDesign([...pairs(N, "H230", "L138"), ["H230", 1]], 600);
      const Y = (2.3 / 1.38) ** (2 * N) * (2.3 ** 2 / 1.52);
      const R = ((1 - Y) / (1 + Y)) ** 2 * 100;
      const r = evaluateSpec(d, { bands: [band({ start: 600, stop: 600, requirement: "min", value: 0 })] });
      expect(r.bands[0]!.worst.value).toBeCloseTo(R, 9);
    }
  });
});
