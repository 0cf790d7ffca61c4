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

describe("fitBuiltPart: joint fits, global stage, baseline", () => {
  it("joint R + T of the NIR bandpass recovers injected per-layer errors to < 0.2 pp RMS, each within 2 SE", () => {
    // Kestrel demo bandpass (apps/api/src/demo/designs.ts); 1 % random errors, 0.1 pp noise, 400–1200 nm
    const d = bandpass905();
    const z = normals(21);
    const injected = d.layers.map(() => 0.01 * z());
    const wl = grid(400, 1200, 1);
    const zn = normals(22);
    const built = (q: "R" | "T") =>
      referenceSpectrum(d, wl, q, 0, "u", (j) => 1 + injected[j]!).map((v) => v + 0.1 * zn());
    const fit = fitBuiltPart(d, [meas(wl, built("T"), "T"), meas(wl, built("R"), "R")], {
      errorModel: { thickness: { relativePct: 1, absoluteNm: 0, distribution: "normal" } },
    });
    expect(fit.models[fit.chosen]!.kind).toBe("layers");
    let ss = 0;
    fit.layers.forEach((l, j) => {
      ss += ((l.fittedNm / l.nominalNm - 1) * 100 - injected[j]! * 100) ** 2;
      expect(l.determinable).toBe(true);
      expect(Math.abs(l.errorPct! - injected[j]! * 100)).toBeLessThan(2 * l.sePct!);
    });
    expect(Math.sqrt(ss / d.layers.length)).toBeLessThan(0.2);
    expect(fit.models[fit.chosen]!.residualVariance).toBeLessThan(1.2);
  });

  it("the global scan finds an 8 % tooling error where a local fit from nominal locks onto the wrong fringe order", () => {
    const d = bandpass905();
    const wl = grid(750, 1100, 2);
    const T = referenceSpectrum(d, wl, "T", 0, "u", () => 1.08);
    const local = fitBuiltPart(d, [meas(wl, T, "T")], { scanSpan: 0, fitIndexScale: false });
    const global = fitBuiltPart(d, [meas(wl, T, "T")], { scanSpan: 0.1, fitIndexScale: false });
    expect(local.models[0]!.residualRmsPct).toBeGreaterThan(1);
    for (const p of global.models[0]!.parameters) expect(p.value).toBeCloseTo(0.08, 6);
    expect(global.models[0]!.residualRmsPct).toBeLessThan(1e-5);
  });

  it("fits a baseline offset and wavelength shift; a fixed baseline is applied as given", () => {
    const d = qwotDesign([
      ["H230", 1],
      ["L138", 1.3],
      ["H230", 0.7],
      ["L138", 1.6],
      ["H230", 0.9],
    ]);
    const wl = grid(420, 900, 2);
    // instrument reads the spectrum at λ + 1.5 nm, 0.4 pp too high
    const T = referenceSpectrum(d, wl.map((w) => w + 1.5), "T", 0, "u", () => 1.01).map((v) => v + 0.4);
    const fit = fitBuiltPart(d, [meas(wl, T, "T")], { baseline: { offset: "fit", shiftNm: "fit" }, fitIndexScale: false });
    const byKind = (k: string) => fit.models[0]!.parameters.find((p) => p.kind === k)!;
    expect(byKind("offset").value).toBeCloseTo(0.4, 4);
    expect(byKind("shift").value).toBeCloseTo(1.5, 3);
    expect(byKind("tooling").value).toBeCloseTo(0.01, 5);
    const fixed = fitBuiltPart(d, [meas(wl, T, "T")], { baseline: { offset: 0.4, shiftNm: 1.5 }, fitIndexScale: false });
    expect(fixed.models[0]!.parameters.every((p) => p.kind === "tooling")).toBe(true);
    expect(fixed.models[0]!.residualRmsPct).toBeLessThan(1e-4);
  });

  it("weights each measurement by its stated uncertainty", () => {
    const d = bandpass905();
    const wl = grid(750, 1100, 2);
    const T = referenceSpectrum(d, wl, "T", 0, "u", () => 1.02);
    // a second reading of the same part that is 5 pp off everywhere, honestly stated as ±50 pp
    const bad = T.map((v) => v + 5);
    const fit = fitBuiltPart(d, [meas(wl, T, "T", 0, "u", 0.1), meas(wl, bad, "T", 0, "u", 50)], { fitIndexScale: false });
    for (const p of fit.models[0]!.parameters) expect(p.value).toBeCloseTo(0.02, 4);
  });

  it("reports progress by stage and stops when asked (the web's cancel terminates the worker instead)", () => {
    const d = bandpass905();
    const wl = grid(850, 960, 2);
    const T = referenceSpectrum(d, wl, "T", 0, "u", () => 1.01);
    const stages: string[] = [];
    const fractions: number[] = [];
    fitBuiltPart(d, [meas(wl, T, "T")], {
      errorModel: { thickness: { relativePct: 0.5, absoluteNm: 0, distribution: "normal" } },
      onProgress: (f, s) => {
        fractions.push(f);
        stages.push(s);
      },
    });
    expect(stages).toEqual(["scan", "tooling", "tooling+index", "layers", "done"]);
    expect(fractions[fractions.length - 1]).toBe(1);
    expect([...fractions].sort((a, b) => a - b)).toEqual(fractions);
    let calls = 0;
    expect(() => fitBuiltPart(d, [meas(wl, T, "T")], { shouldStop: () => ++calls > 20 })).toThrow(/fit cancelled/);
  });

  it("refuses bad input with a RangeError naming the value", () => {
    const d = bandpass905();
    expect(() => fitBuiltPart(d, [])).toThrow(/measurements: expected at least one/);
    expect(() => fitBuiltPart(d, [meas([900, 800], [1, 2], "T")])).toThrow(/measurements\[0\]\.wavelengths\[1\].*800/);
    expect(() => fitBuiltPart(d, [meas([800, 900], [1, 2], "T", 0, "u", -1)])).toThrow(/uncertaintyPct.*-1/);
    expect(() => fitBuiltPart(d, [meas([800, 900], [1, 2], "T")], { scanSpan: 0.7 })).toThrow(/scanSpan.*0\.7/);
  });
});
