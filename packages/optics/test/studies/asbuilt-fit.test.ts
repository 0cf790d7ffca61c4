// As-built fits against synthetic measurements made by the independent reference in asbuilt-reference.ts.
import { describe, expect, it } from "vitest";
import { computeSpectrum } from "../../src/core/index.ts";
import { fitBuiltPart, type MeasuredSpectrum } from "../../src/studies/asbuilt/index.ts";
import { qwotDesign } from "./fixtures.ts";
import { bandpass905, dichroic, grid, normals, referenceSpectrum } from "./asbuilt-reference.ts";

const meas = (
  wavelengths: number[],
  values: number[],
  quantity: "R" | "T",
  angleDeg = 0,
  polarization: "s" | "p" | "u" = "u",
  uncertaintyPct = 0.1,
): MeasuredSpectrum => ({ wavelengths, values, quantity, angleDeg, polarization, uncertaintyPct });

const noisy = (values: number[], sigma: number, seed: number): number[] => {
  const z = normals(seed);
  return values.map((v) => v + sigma * z());
};

describe("reference implementation", () => {
  it("agrees with the engine on the bandpass (both are Macleod's characteristic-matrix method)", () => {
    const d = bandpass905();
    const wl = grid(850, 960, 5);
    const ref = referenceSpectrum(d, wl, "T", 0, "u");
    const eng = computeSpectrum(d, { wavelengths: wl }).u.T;
    ref.forEach((v, i) => expect(v).toBeCloseTo((eng[i] as number) * 100, 9));
  });
});

describe("fitBuiltPart", () => {
  it("recovers a pure tooling error exactly with the tooling model (bandpass, every layer 1.5 % thick)", () => {
    // the case: the old per-layer fit reported −40 to −50 % and stopped at 7.7 % RMS
    const d = bandpass905();
    const wl = grid(800, 1010, 1);
    const T = referenceSpectrum(d, wl, "T", 0, "u", () => 1.015);
    const fit = fitBuiltPart(d, [meas(wl, T, "T")], {
      errorModel: { thickness: { relativePct: 0.3, absoluteNm: 0.2, distribution: "normal" } },
    });
    const chosen = fit.models[fit.chosen]!;
    expect(chosen.kind).toBe("tooling");
    for (const p of chosen.parameters) expect(p.value).toBeCloseTo(0.015, 7);
    expect(chosen.residualRmsPct).toBeLessThan(1e-5);
    fit.layers.forEach((l) => expect(l.errorPct).toBeCloseTo(1.5, 5));
    expect(fit.reason).toMatch(/BIC/);
  });

  it("flags the dichroic's first layer (SiO2 on fused silica) as not determinable; determinable layers within 2 SE", () => {
    const d = dichroic();
    const z = normals(11);
    const injected = d.layers.map(() => 0.005 * z());
    const wl = grid(400, 700, 2);
    const T = noisy(referenceSpectrum(d, wl, "T", 45, "u", (j) => 1 + injected[j]!), 0.1, 12);
    const fit = fitBuiltPart(d, [meas(wl, T, "T", 45)], {
      errorModel: { thickness: { relativePct: 0.5, absoluteNm: 0, distribution: "normal" } },
    });
    const layers = fit.models.find((m) => m.kind === "layers")!;
    expect(layers.layers[0]!.determinable).toBe(false);
    expect(layers.layers[0]!.errorPct).toBeNull();
    expect(layers.layers[0]!.reason).toMatch(/prior/);
    let determinable = 0;
    for (const l of fit.layers) {
      if (!l.determinable) continue;
      determinable++;
      expect(Math.abs(l.errorPct! - injected[l.index]! * 100)).toBeLessThan(2 * l.sePct!);
    }
    expect(determinable).toBeGreaterThan(0);
  });
});
