// End to end: 50 simulated coating runs (tooling per material + random per-layer errors), each part measured
// by the independent reference (R and T with noise), fitted by fitBuiltPart, then the process model estimated
// from the fits by calibrateErrorModel: its 95 % intervals must contain the σ the runs were simulated with.
import { describe, expect, it } from "vitest";
import { calibrateErrorModel, fitBuiltPart, type CalibrationPart } from "../../src/studies/asbuilt/index.ts";
import { qwotDesign } from "./fixtures.ts";
import { grid, normals, referenceSpectrum } from "./asbuilt-reference.ts";

describe("calibration from fitted runs", () => {
  it("50 runs simulated with σ_sys = 1 %, σ_rand = 0.7 % give intervals that contain them", () => {
    const d = qwotDesign([
      ["H230", 1.3],
      ["L138", 0.8],
      ["H230", 1.1],
      ["L138", 1.5],
      ["H230", 0.9],
      ["L138", 1.2],
    ]);
    const wl = grid(400, 1000, 3);
    const z = normals(2026);
    const sys = 1;
    const rand = 0.7;
    const parts: CalibrationPart[] = [];
    for (let r = 0; r < 50; r++) {
      const t: Record<string, number> = { H230: (sys / 100) * z(), L138: (sys / 100) * z() };
      const e = d.layers.map((l) => (1 + t[l.material]!) * (1 + (rand / 100) * z()));
      const meas = (q: "R" | "T") => ({
        wavelengths: wl,
        values: referenceSpectrum(d, wl, q, 0, "u", (j) => e[j]!).map((v) => v + 0.05 * z()),
        quantity: q,
        angleDeg: 0,
        polarization: "u" as const,
        uncertaintyPct: 0.05,
      });
      const fit = fitBuiltPart(d, [meas("R"), meas("T")], {
        errorModel: { thickness: { relativePct: rand, absoluteNm: 0, distribution: "normal" }, systematicPct: sys },
        fitIndexScale: false,
        scanSpan: 0.05,
      });
      parts.push({
        runId: `run-${r}`,
        layers: fit.layers
          .filter((l) => l.determinable)
          .map((l) => ({ material: l.material, errorPct: l.errorPct!, sePct: l.sePct! })),
      });
    }
    const c = calibrateErrorModel(parts);
    expect(parts.every((p) => p.layers.length === 6)).toBe(true);
    expect(c.random!.lowPct).toBeLessThan(rand);
    expect(c.random!.highPct).toBeGreaterThan(rand);
    for (const m of ["H230", "L138"]) {
      expect(c.systematic[m]!.lowPct).toBeLessThan(sys);
      expect(c.systematic[m]!.highPct).toBeGreaterThan(sys);
    }
  }, 120000);
});
