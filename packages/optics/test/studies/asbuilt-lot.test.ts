// Lot verdicts with a guard band, lot yield, and calibration of the process model from fitted runs.
import { describe, expect, it } from "vitest";
import {
  calibrateErrorModel,
  chiSquareQuantile,
  lotYield,
  partVerdict,
  type CalibrationPart,
  type MeasuredPart,
} from "../../src/studies/asbuilt/index.ts";
import type { SpecMask } from "../../src/studies/spec.ts";
import { normals } from "./asbuilt-reference.ts";

const mask: SpecMask = {
  bands: [
    { id: "pass", start: 500, stop: 600, quantity: "T", polarization: "u", angleDeg: 0, requirement: "min", value: 90 },
    { id: "block", start: 700, stop: 800, quantity: "T", polarization: "u", angleDeg: 0, requirement: "max", value: 1 },
  ],
};
const flatPart = (id: string, pass: number, block: number, u = 0.2): MeasuredPart => ({
  id,
  measurements: [
    {
      wavelengths: [400, 650, 651, 900],
      values: [pass, pass, block, block],
      quantity: "T",
      angleDeg: 0,
      polarization: "u",
      uncertaintyPct: u,
    },
  ],
});

describe("partVerdict: guard band", () => {
  it("a part exactly at the limit fails when the measurement uncertainty is counted", () => {
    // guard band: pass only if margin > k·u (ISO 14253-1 conformance zone; common practice)
    const v = partVerdict(mask, flatPart("p1", 90, 0.5), 2);
    expect(v.bands[0]!.margin).toBe(0);
    expect(v.bands[0]!.status).toBe("fail");
    expect(v.status).toBe("fail");
  });
  it("the same part passes when the guard band is switched off (k = 0): the limit itself is inside", () => {
    expect(partVerdict(mask, flatPart("p1", 90, 0.5), 0).status).toBe("pass");
  });
  it("a part inside the limit by less than k·u fails; by more passes", () => {
    expect(partVerdict(mask, flatPart("p", 90.39, 0.5, 0.2), 2).status).toBe("fail");
    expect(partVerdict(mask, flatPart("p", 90.41, 0.5, 0.2), 2).status).toBe("pass");
    expect(partVerdict(mask, flatPart("p", 95, 0.61, 0.2), 2).bands[1]!.status).toBe("fail");
  });
  it("a band no measurement covers is not-measured and the part is incomplete, not passed", () => {
    const p: MeasuredPart = { id: "p", measurements: [{ ...flatPart("p", 95, 0.1).measurements[0]!, angleDeg: 45 }] };
    const v = partVerdict(mask, p);
    expect(v.bands.map((b) => b.status)).toEqual(["not-measured", "not-measured"]);
    expect(v.status).toBe("incomplete");
  });
  it("lot yield counts complete verdicts, with the Wilson interval, next to the prediction", () => {
    const parts = [flatPart("a", 95, 0.1), flatPart("b", 95, 0.1), flatPart("c", 80, 0.1), flatPart("d", 95, 0.1)];
    const y = lotYield(parts.map((p) => partVerdict(mask, p)), { yield: 0.9, low: 0.87, high: 0.93 });
    expect(y.passed).toBe(3);
    expect(y.yield).toBe(0.75);
    // Wilson 95 % for 3/4 (Newcombe 1998, method 3): 0.301–0.954
    expect(y.interval!.low).toBeCloseTo(0.3006, 3);
    expect(y.interval!.high).toBeCloseTo(0.9544, 3);
    expect(y.predicted!.overlaps).toBe(true);
  });
});

describe("calibrateErrorModel", () => {
  it("chi-square quantiles match the table (NIST/SEMATECH e-Handbook 1.3.6.7.4) to 1 %", () => {
    expect(Math.abs(chiSquareQuantile(10, 1.959964) / 20.483 - 1)).toBeLessThan(0.01);
    expect(Math.abs(chiSquareQuantile(10, -1.959964) / 3.247 - 1)).toBeLessThan(0.01);
    expect(Math.abs(chiSquareQuantile(50, 1.959964) / 71.42 - 1)).toBeLessThan(0.01);
    expect(Math.abs(chiSquareQuantile(50, -1.959964) / 32.357 - 1)).toBeLessThan(0.01);
  });

  const simulate = (seed: number, runs = 50): CalibrationPart[] => {
    // known process: σ_sys 0.8 % (H) and 0.4 % (L), σ_rand 0.5 %, fit standard errors 0.1 %
    const z = normals(seed);
    return Array.from({ length: runs }, (_, r) => {
      const t: Record<string, number> = { H: 0.8 * z(), L: 0.4 * z() };
      return {
        runId: `run-${r}`,
        layers: Array.from({ length: 20 }, (_, j) => {
          const material = j % 2 === 0 ? "H" : "L";
          return { material, errorPct: t[material]! + 0.5 * z() + 0.1 * z(), sePct: 0.1 };
        }),
        index: { H: { valuePct: 0.3 * z() + 0.05 * z(), sePct: 0.05 } },
      };
    });
  };

  it("50 synthetic runs with known σ give intervals containing them", () => {
    const c = calibrateErrorModel(simulate(7));
    expect(c.runs).toBe(50);
    expect(c.random!.lowPct).toBeLessThan(0.5);
    expect(c.random!.highPct).toBeGreaterThan(0.5);
    expect(c.systematic.H!.lowPct).toBeLessThan(0.8);
    expect(c.systematic.H!.highPct).toBeGreaterThan(0.8);
    expect(c.systematic.L!.lowPct).toBeLessThan(0.4);
    expect(c.systematic.L!.highPct).toBeGreaterThan(0.4);
    expect(c.indexDrift.H!.lowPct).toBeLessThan(0.3);
    expect(c.indexDrift.H!.highPct).toBeGreaterThan(0.3);
    expect(c.proposed.thickness.relativePct).toBeCloseTo(c.random!.sigmaPct, 2);
  });

  it("the 95 % interval of the tooling σ covers the truth in 90–99 % of 200 simulated calibrations", () => {
    let covered = 0;
    for (let s = 0; s < 200; s++) {
      const c = calibrateErrorModel(simulate(1000 + s));
      if (c.systematic.H!.lowPct < 0.8 && c.systematic.H!.highPct > 0.8) covered++;
    }
    expect(covered / 200).toBeGreaterThan(0.9);
    expect(covered / 200).toBeLessThan(0.99);
  });

  it("refuses a part without a run id", () => {
    expect(() => calibrateErrorModel([{ runId: "", layers: [] }])).toThrow(/parts\[0\]\.runId/);
  });
});
