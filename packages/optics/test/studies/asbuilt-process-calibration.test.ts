// Calibration of the process model from fitted runs: 50 coating runs are simulated by the process sampler with
// known parameters (the Monte Carlo's own model), each layer's fitted error is the realised error plus the fit's
// noise (s = 0.1 %; the fit itself is checked end to end in asbuilt-calibration.test.ts), and
// calibrateProcessModel must give 95 % intervals that contain the parameters the runs were made with.
// Interval formulas: chi-square interval of σ (NIST/SEMATECH e-Handbook of Statistical Methods, 1.3.5.8), with
// Satterthwaite's effective degrees of freedom where σ² is not a plain sum of squares (Satterthwaite, Biometrics
// Bulletin 2:110, 1946); Fisher's z interval for the drift correlation ρ (Fisher, Biometrika 10:507, 1915); both
// with bootstrap variances (Efron & Tibshirani, An Introduction to the Bootstrap, 1993) where no closed form exists.
import { describe, expect, it } from "vitest";
import type { Design } from "../../src/core/index.ts";
import {
  calibrateProcessModel,
  fitBuiltPart,
  processPriors,
  type CalibrationPart,
} from "../../src/studies/asbuilt/index.ts";
import { grid, referenceSpectrum } from "./asbuilt-reference.ts";
import { parseErrorModel, type ErrorModel } from "../../src/studies/error-model.ts";
import { createProcessSampler, type ProcessModelInput } from "../../src/studies/process/index.ts";
import { TrialRandom } from "../../src/studies/random.ts";
import { qwotDesign } from "./fixtures.ts";

const noErrors = { relativePct: 0, absoluteNm: 0, distribution: "normal" as const };
const model = (process: ProcessModelInput): ErrorModel => ({ thickness: noErrors, process });

/** 50 runs of `design` under `truth`, one part each, fitted errors = realised + N(0, s). */
function simulatedRuns(
  design: Design,
  truth: ErrorModel,
  seed: string,
  s = 0.1,
  runs = 50,
): CalibrationPart[] {
  const sampler = createProcessSampler(parseErrorModel(truth), design);
  const nominal = Float64Array.from(design.layers, (l) => l.thickness);
  const th = new Float64Array(nominal.length);
  const scale = new Float64Array(nominal.length);
  const rng = new TrialRandom();
  const noise = new TrialRandom();
  return Array.from({ length: runs }, (_, r) => {
    sampler.sample(rng, seed, r, nominal, th, scale);
    noise.reset(`${seed}:fit`, r);
    return {
      runId: `run-${r}`,
      designKey: "rev-1",
      layers: design.layers.map((l, j) => ({
        material: l.material,
        index: j,
        nominalNm: l.thickness,
        errorPct: 100 * (th[j]! / nominal[j]! - 1) + s * noise.normal(),
        sePct: s,
      })),
    };
  });
}

const alternating = (layers: number) =>
  qwotDesign(Array.from({ length: layers }, (_, i) => [i % 2 ? "L138" : "H230", 1] as [string, number]));

describe("calibrateProcessModel", () => {
  it("quartz crystal: tooling σ per material from the per-run means and per-layer noise σ contain the simulated 0.8 % and 0.4 % (chi-square, NIST/SEMATECH 1.3.5.8)", () => {
    const design = alternating(12);
    const crystal = { method: "crystal" as const, toolingPct: 0.8, noisePct: 0.4, terminationNm: 0.2 };
    const truth = model({ control: { H230: crystal, L138: crystal } });
    // the program's current model is off (1.5 % tooling, 0.2 % noise): calibration must find the truth
    const program = model({
      control: {
        H230: { ...crystal, toolingPct: 1.5, noisePct: 0.2 },
        L138: { ...crystal, toolingPct: 1.5, noisePct: 0.2 },
      },
    });
    const c = calibrateProcessModel(simulatedRuns(design, truth, "crystal"), program);
    expect(c.runs).toBe(50);
    for (const m of ["H230", "L138"]) {
      const tooling = c.parameters.find((p) => p.material === m && p.parameter === "toolingPct")!;
      const noise = c.parameters.find((p) => p.material === m && p.parameter === "noisePct")!;
      expect(tooling).toMatchObject({
        method: "crystal",
        interval: "chi-square",
        dof: 49,
        current: 1.5,
        consistent: false,
      });
      expect(tooling.low).toBeLessThan(0.8);
      expect(tooling.high).toBeGreaterThan(0.8);
      expect(noise).toMatchObject({ interval: "chi-square", dof: 250, current: 0.2, consistent: false });
      expect(noise.low).toBeLessThan(0.4);
      expect(noise.high).toBeGreaterThan(0.4);
    }
    // adopt: the program's process model, same structure, calibrated numbers; termination kept
    const proposed = c.proposed!.process!.control as Record<
      string,
      { method: string; toolingPct: number; noisePct: number; terminationNm: number }
    >;
    expect(Object.keys(proposed).sort()).toEqual(["H230", "L138"]);
    for (const m of ["H230", "L138"]) {
      expect(proposed[m]!.method).toBe("crystal");
      expect(proposed[m]!.terminationNm).toBe(0.2);
      expect(proposed[m]!.toolingPct).toBeCloseTo(
        c.parameters.find((p) => p.material === m && p.parameter === "toolingPct")!.value,
        2,
      );
    }
    expect(() => parseErrorModel(c.proposed!)).not.toThrow();
  });

  it("time control: rate error σ, AR(1) drift σ and correlation ρ, within-layer σ — each interval contains the simulated value (Satterthwaite chi-square for σ, Fisher z for ρ)", () => {
    const design = alternating(30);
    const time = {
      method: "time" as const,
      rateErrorPct: 0.5,
      rateDriftPct: 0.8,
      driftCorrelation: 0.8,
      withinLayerPct: 0.3,
    };
    const c = calibrateProcessModel(
      simulatedRuns(design, model({ control: time }), "time"),
      model({ control: { ...time, driftCorrelation: 0.3 } }),
    );
    const truth: Record<string, number> = {
      rateErrorPct: 0.5,
      rateDriftPct: 0.8,
      driftCorrelation: 0.8,
      withinLayerPct: 0.3,
    };
    expect(c.parameters.map((p) => p.parameter).sort()).toEqual([
      "driftCorrelation",
      "rateDriftPct",
      "rateErrorPct",
      "withinLayerPct",
    ]);
    for (const p of c.parameters) {
      expect(p.material).toBeNull(); // one control for every material: pooled
      expect(p.low).toBeLessThanOrEqual(truth[p.parameter]!);
      expect(p.high).toBeGreaterThanOrEqual(truth[p.parameter]!);
    }
    const rho = c.parameters.find((p) => p.parameter === "driftCorrelation")!;
    expect(rho.interval).toBe("Fisher z");
    // the program said ρ = 0.3: the data exclude it
    expect(rho.consistent).toBe(false);
    const proposed = c.proposed!.process!.control as { method: string; driftCorrelation: number };
    expect(proposed.method).toBe("time");
    expect(proposed.driftCorrelation).toBeCloseTo(rho.value, 3);
  }, 30000);

  it("time control with layers at fewer than three spacings holds ρ at the program's value and says so", () => {
    const design = alternating(4); // per material, lags 2 only
    const time = { method: "time" as const, rateErrorPct: 0.5, rateDriftPct: 0.8, driftCorrelation: 0.8 };
    const c = calibrateProcessModel(
      simulatedRuns(design, model({ control: time }), "short"),
      model({ control: time }),
      { bootstrap: 50 },
    );
    expect(c.parameters.some((p) => p.parameter === "driftCorrelation")).toBe(false);
    expect(c.notes.join(" ")).toMatch(
      /fewer than 3 different spacings; the drift correlation ρ is held at the program's 0.8/,
    );
  });

  describe("optical monitoring: realised σ per layer against processErrorStats", () => {
    // 8 non-quarter-wave layers cut at levels at 550 nm on the part (process.test.ts)
    const design = qwotDesign([
      ["H230", 0.6],
      ["L138", 1.3],
      ["H230", 0.7],
      ["L138", 0.9],
      ["H230", 1.4],
      ["L138", 0.5],
      ["H230", 0.8],
      ["L138", 1.2],
    ]);
    const optical = (noisePct: number) =>
      model({
        control: { method: "optical", noisePct, overshootSigmaNm: noisePct },
        plan: design.layers.map(() => ({ wavelength: 550, criterion: "level" as const })),
      });

    // A 95 % interval misses one dataset in twenty: the first dataset tried here ("opt-ok") gave 0.871
    // (0.795–0.966). So the right-model check counts coverage over 8 independent datasets: at least 6 must
    // contain 1 (binomial, p = 0.95: fewer than 6 happens with probability 0.006).
    it("a right model: over 8 datasets the scale's interval contains 1 (at least 6 times) and the layers agree with the prediction", () => {
      let covered = 0;
      let consistent = 0;
      for (let k = 0; k < 8; k++) {
        const c = calibrateProcessModel(
          simulatedRuns(design, optical(0.3), `opt-ok-${k}`, 0.05),
          optical(0.3),
          { designs: { "rev-1": design }, bootstrap: 100 },
        );
        const s = c.parameters.find((p) => p.parameter === "opticalScale")!;
        if (s.low <= 1 && s.high >= 1) covered++;
        expect(c.layers).toHaveLength(8);
        consistent += c.layers.filter((l) => l.consistent).length;
      }
      expect(covered).toBeGreaterThanOrEqual(6);
      // each layer's chi-square interval (ν = 49) contains the prediction about 95 % of the time: 61 of 64 expected
      expect(consistent).toBeGreaterThanOrEqual(54);
    }, 60000);

    it("a model with half the real noise: every layer's realised σ excludes the prediction, the scale's interval contains the true 2 and the proposal doubles the spreads", () => {
      const c = calibrateProcessModel(simulatedRuns(design, optical(0.6), "opt-half", 0.05), optical(0.3), {
        designs: { "rev-1": design },
      });
      const s = c.parameters.find((p) => p.parameter === "opticalScale")!;
      expect(s.low).toBeLessThan(2);
      expect(s.high).toBeGreaterThan(2);
      expect(s.consistent).toBe(false);
      expect(c.layers.every((l) => !l.consistent && l.realisedPct > l.predictedPct)).toBe(true);
      const control = c.proposed!.process!.control as { noisePct: number; overshootSigmaNm: number };
      expect(control.noisePct).toBeCloseTo(0.3 * s.value, 2);
      expect(control.overshootSigmaNm).toBeCloseTo(0.3 * s.value, 2);
    }, 30000);

    it("without the design it cannot predict, and says so", () => {
      const c = calibrateProcessModel(
        simulatedRuns(design, optical(0.3), "opt-nodesign", 0.05),
        optical(0.3),
      );
      expect(c.layers).toEqual([]);
      expect(c.notes.join(" ")).toMatch(/No design given/);
    });
  });

  it("the as-built fit takes its priors from the program's process model (crystal noise and termination/d, time drift and within-layer, optical processErrorStats), so process programs get per-layer errors to calibrate from", () => {
    const design = alternating(4);
    const em = model({
      control: {
        H230: { method: "crystal", toolingPct: 0.8, noisePct: 0.4, terminationNm: 0.3 },
        L138: { method: "time", rateErrorPct: 0.5, rateDriftPct: 0.6, withinLayerPct: 0.8, shutterNm: 0.2 },
      },
    });
    const p = processPriors(design, em);
    expect(p.tooling).toEqual({ H230: 0.008, L138: 0.005 });
    design.layers.forEach((l, j) => {
      const expected =
        l.material === "H230"
          ? Math.hypot(0.004, 0.3 / l.thickness)
          : Math.hypot(0.006, 0.008, 0.2 / l.thickness);
      expect(p.layer[j]).toBeCloseTo(expected, 12);
    });
    const wl = grid(400, 1000, 4);
    const meas = (q: "R" | "T") => ({
      wavelengths: wl,
      values: referenceSpectrum(design, wl, q, 0, "u", (j) => [1.01, 0.995, 1.012, 0.99][j]!),
      quantity: q,
      angleDeg: 0,
      polarization: "u" as const,
      uncertaintyPct: 0.05,
    });
    const fit = fitBuiltPart(design, [meas("R"), meas("T")], {
      errorModel: em,
      fitIndexScale: false,
      scanSpan: 0.05,
    });
    expect(fit.models.map((m) => m.kind)).toContain("layers");
    const layersModel = fit.models.find((m) => m.kind === "layers")!;
    expect(layersModel.parameters.filter((q) => q.kind === "layer").map((q) => q.priorSigma)).toEqual(
      p.layer,
    );
  });

  it("refuses what it cannot calibrate, naming the value", () => {
    const parts = simulatedRuns(
      alternating(4),
      model({ control: { method: "crystal", toolingPct: 1 } }),
      "bad",
      0.1,
      3,
    );
    expect(() => calibrateProcessModel(parts, { thickness: noErrors })).toThrow(
      /errorModel\.process: expected a process model/,
    );
    expect(() => calibrateProcessModel([], model({ control: { method: "crystal" } }))).toThrow(
      /parts: expected at least one/,
    );
    const noIndex = parts.map((p) => ({ ...p, layers: p.layers.map(({ index: _i, ...l }) => l) }));
    expect(() => calibrateProcessModel(noIndex, model({ control: { method: "crystal" } }))).toThrow(
      /layers\[0\]\.index/,
    );
    expect(() =>
      calibrateProcessModel(parts, model({ control: { method: "crystal" } }), { bootstrap: 3 }),
    ).toThrow(/bootstrap: expected an integer in 20\.\.5000, got 3/);
  });
});
