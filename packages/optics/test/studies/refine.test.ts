import { describe, expect, it } from "vitest";
import {
  evaluateSpec,
  fitAsBuilt,
  refineDesign,
  refineForYield,
  withThicknesses,
} from "../../src/studies/index.ts";
import type { SpecMask, YieldStudy } from "../../src/studies/index.ts";
import { computeSpectrum } from "../../src/core/index.ts";
import { htwAr4 } from "./fixtures.ts";

// The mask of docs/examples/study-htw-ar4.json.
const mask: SpecMask = {
  bands: [
    {
      id: "vis-max",
      start: 430,
      stop: 670,
      step: 2,
      quantity: "R",
      polarization: "u",
      angleDeg: 0,
      requirement: "max",
      value: 0.6,
    },
    {
      id: "vis-avg",
      start: 450,
      stop: 650,
      step: 5,
      quantity: "R",
      polarization: "u",
      angleDeg: 0,
      requirement: "avgMax",
      value: 0.3,
    },
    {
      id: "oblique-30",
      start: 450,
      stop: 650,
      step: 10,
      quantity: "R",
      polarization: "s",
      angleDeg: 30,
      requirement: "max",
      value: 1.2,
      tolerance: 0.1,
    },
  ],
};
const perturb = [1.08, 0.92, 1.08, 0.92];
const perturbed = () => {
  const d = htwAr4();
  return withThicknesses(
    d,
    d.layers.map((l, i) => l.thickness * (perturb[i] as number)),
  );
};

describe("refineDesign", () => {
  it("brings a design perturbed by ±8 % back inside its mask", () => {
    const start = perturbed();
    expect(evaluateSpec(start, mask).pass).toBe(false);
    const res = refineDesign(start, mask);
    expect(res.meritBefore).toBeGreaterThan(0);
    expect(res.meritAfter).toBe(0);
    const check = evaluateSpec(res.design, mask);
    expect(check.pass).toBe(true);
    // refined with the default 0.1-point margin goal: every band keeps some margin
    check.bands.forEach((b) => expect(b.margin).toBeGreaterThan(0.05));
    expect(res.changedLayers.length).toBeGreaterThan(0);
  });

  it("keeps locked layers and bounds", () => {
    const start = perturbed();
    start.layers[3] = { ...start.layers[3]!, locked: true };
    const res = refineDesign(start, mask, {
      lockedLayers: [0],
      layerBounds: [{ index: 1, min: 40, max: 50 }],
    });
    expect(res.design.layers[3]?.thickness).toBe(start.layers[3]?.thickness);
    expect(res.design.layers[0]?.thickness).toBe(start.layers[0]?.thickness);
    expect(res.design.layers[1]?.thickness).toBeGreaterThanOrEqual(40);
    expect(res.design.layers[1]?.thickness).toBeLessThanOrEqual(50);
    expect(res.changedLayers.every((c) => c.index === 1 || c.index === 2)).toBe(true);
    expect(res.meritAfter).toBeLessThan(res.meritBefore);
  });

  it("rejects bad options with a RangeError naming the value", () => {
    expect(() => refineDesign(htwAr4(), mask, { lockedLayers: [7] })).toThrow(
      /lockedLayers: layer index must be in 0\.\.3, got 7/,
    );
    expect(() => refineDesign(htwAr4(), mask, { minThickness: -1 })).toThrow(
      /minThickness must be ≥ 0 nm, got -1/,
    );
  });
});

describe("least-squares recovery of a known design from its spectrum", () => {
  it("recovers the four-layer AR from a start perturbed by ±8 % (target = its own R, 380–1000 nm)", () => {
    const known = htwAr4();
    const wavelengths = Array.from({ length: 125 }, (_, i) => 380 + i * 5);
    const target = computeSpectrum(known, { wavelengths });
    const values = Array.from(target.u.R, (r) => r * 100);
    const start = perturbed();
    const fit = fitAsBuilt(start, { wavelengths, values, quantity: "R", angleDeg: 0, polarization: "u" });
    fit.design.layers.forEach((l, i) => expect(l.thickness).toBeCloseTo(known.layers[i]!.thickness, 2));
    expect(fit.residualRms).toBeLessThan(1e-5);
  });
});

describe("refineForYield", () => {
  it("raises the yield of a marginal design under its error model (deterministic)", () => {
    const study: YieldStudy = {
      design: htwAr4(),
      mask: { bands: [{ ...mask.bands[0]!, value: 0.5 }, mask.bands[1]!, mask.bands[2]!] },
      errorModel: { thickness: { relativePct: 1, absoluteNm: 0.3, distribution: "normal" } },
      trials: 300,
      seed: "HTW-AR4-refine",
    };
    const a = refineForYield(study, { crnTrials: 24, maxIterations: 6 });
    expect(a.yieldBefore).toBeLessThan(0.9);
    expect(a.yieldAfter).toBeGreaterThan(a.yieldBefore);
    expect(a.meanMeritAfter).toBeLessThan(a.meanMeritBefore);
    expect(a.intervalAfter.low).toBeLessThanOrEqual(a.yieldAfter);
    const b = refineForYield(study, { crnTrials: 24, maxIterations: 6 });
    expect(b).toEqual(a);
  });
});
