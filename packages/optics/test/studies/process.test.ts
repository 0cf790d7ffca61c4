import { describe, expect, it } from "vitest";
import { computeSpectrum, createStackEvaluator } from "../../src/core/index.ts";
import type { Design } from "../../src/core/index.ts";
import { createTrialSampler, parseErrorModel, scaleErrorModel } from "../../src/studies/error-model.ts";
import type { ErrorModel } from "../../src/studies/error-model.ts";
import {
  createProcessSampler,
  defaultMonitoringPlan,
  describeProcess,
  monitoringTraces,
  processErrorStats,
} from "../../src/studies/process/index.ts";
import { TrialRandom } from "../../src/studies/random.ts";
import { qwotDesign } from "./fixtures.ts";

const noErrors = { relativePct: 0, absoluteNm: 0, distribution: "normal" as const };

/** Sample `trials` builds and return the realised thicknesses (nm) per trial. */
function builds(design: Design, model: ErrorModel, trials: number, seed = "HTW"): Float64Array[] {
  const sampler = createProcessSampler(parseErrorModel(model), design);
  const nominal = Float64Array.from(design.layers, (l) => l.thickness);
  const rng = new TrialRandom();
  const out: Float64Array[] = [];
  const scale = new Float64Array(nominal.length);
  for (let t = 0; t < trials; t++) {
    const th = new Float64Array(nominal.length);
    sampler.sample(rng, seed, t, nominal, th, scale);
    out.push(th);
  }
  return out;
}

describe("process model: optical monitoring", () => {
  it("turning point of a single quarter-wave layer on a substrate falls at the quarter-wave thickness (Macleod, Thin-Film Optical Filters, monitoring chapter)", () => {
    const design = qwotDesign([["H230", 1]]);
    const model: ErrorModel = { thickness: noErrors, process: { version: 1, control: { method: "optical", signal: "T", noisePct: 0, driftPct: 0, overshootNm: 0, overshootSigmaNm: 0 } } };
    const { traces, thicknesses } = monitoringTraces(design, model, "qw", 0, 401);
    const qw = 550 / (4 * 2.3);
    expect(traces).toHaveLength(1);
    const t = traces[0]!;
    expect(t.criterion).toBe("turning");
    expect(Math.abs(t.cut.thickness - qw)).toBeLessThan(1e-9 * qw);
    expect(Math.abs(thicknesses[0]! - qw)).toBeLessThan(1e-9 * qw);
    // the cut value is the extremum of the trace: T at a quarter wave = 1 − ((n0 ns − n²)/(n0 ns + n²))² (Macleod, single layer)
    const tQw = 1 - ((1.52 - 2.3 ** 2) / (1.52 + 2.3 ** 2)) ** 2;
    expect(t.cut.value).toBeCloseTo(tQw, 12);
    expect(Math.min(...t.values)).toBeGreaterThanOrEqual(tQw - 1e-12);
  });

  it("level trigger equals the nominal stack's signal at the nominal thickness (reference: computeSpectrum of the partial stack)", () => {
    const design = qwotDesign([["H230", 0.6], ["L138", 1.3], ["H230", 0.7]]);
    const model: ErrorModel = {
      thickness: noErrors,
      process: { version: 1, control: { method: "optical", signal: "T", noisePct: 0, driftPct: 0, overshootNm: 0, overshootSigmaNm: 0 }, plan: design.layers.map(() => ({ wavelength: 633, on: "part", criterion: "level" })) },
    };
    const { traces } = monitoringTraces(design, model, "lv", 0);
    expect(traces).toHaveLength(3);
    traces.forEach((t, j) => {
      const partial: Design = { ...design, layers: design.layers.slice(0, j + 1) };
      const ref = computeSpectrum(partial, { wavelengths: [633], angleDeg: 0 }).u.T[0]!;
      expect(t.trigger).not.toBeNull();
      expect(Math.abs(t.trigger! - ref)).toBeLessThan(1e-12);
    });
  });

  it("with zero noise every process reproduces the nominal design (time, crystal, optical turning + level, witness chips, uniformity at the reference radius)", () => {
    const design = qwotDesign([["H230", 1], ["L138", 1], ["H230", 0.6], ["L138", 1.3], ["H230", 2], ["L138", 0.8]]);
    const plan = defaultMonitoringPlan(design);
    // layer 4 is a half wave but sits on a stack whose admittance is not real: its end is no turning point
    expect(plan.map((p) => p.criterion)).toEqual(["turning", "turning", "level", "level", "level", "level"]);
    const processes = [
      { control: { method: "time" } },
      { control: { method: "crystal" } },
      { control: { method: "optical" } },
      { control: { method: "optical", signal: "R" }, plan: plan.map((p, j) => (j % 2 && j > 1 ? { wavelength: 600, on: "witness", criterion: "level" } : { ...p, on: j % 2 ? "witness" : "part" })), witness: { everyLayers: 2 } },
      { control: { H230: { method: "optical" }, L138: { method: "crystal" } }, uniformity: { a: -1e-5, radiusMm: 0 } },
    ];
    for (const process of processes) {
      const [th] = builds(design, { thickness: { relativePct: 3, absoluteNm: 1, distribution: "normal" }, systematicPct: 2, process } as ErrorModel, 1);
      design.layers.forEach((l, j) => expect(Math.abs(th![j]! - l.thickness)).toBeLessThan(1e-6));
    }
  });

  it("narrowband all-quarter-wave filter, turning points at its centre wavelength: centre-wavelength σ ≤ 1/5 of the independent model's with the same termination errors (Macleod, Optica Acta 19, 1972)", () => {
    const H = "H230";
    const Lo = "L138";
    const design = qwotDesign([[H, 1], [Lo, 1], [H, 1], [Lo, 1], [H, 1], [Lo, 1], [H, 2], [Lo, 1], [H, 1], [Lo, 1], [H, 1], [Lo, 1], [H, 1]]);
    const independent: ErrorModel = { thickness: { relativePct: 0, absoluteNm: 1, distribution: "normal" } };
    const monitored: ErrorModel = { ...independent, process: { version: 1, control: { method: "optical", signal: "T", noisePct: 0, driftPct: 0, overshootNm: 0, overshootSigmaNm: 1 } } };
    const wl = Array.from({ length: 801 }, (_, i) => 510 + i * 0.1);
    const centreSigma = (model: ErrorModel): number => {
      const sampler = model.process
        ? createProcessSampler(model, design)
        : createTrialSampler(model, design.layers.map((l) => l.material));
      const rng = new TrialRandom();
      const nominal = Float64Array.from(design.layers, (l) => l.thickness);
      const th = new Float64Array(nominal.length);
      const sc = new Float64Array(nominal.length);
      const centres: number[] = [];
      const ev = createStackEvaluator(design, { wavelengths: wl, angleDeg: 0, polarization: "s" });
      const out = { R: new Float64Array(wl.length), T: new Float64Array(wl.length), A: new Float64Array(wl.length) };
      const T = out.T;
      for (let t = 0; t < 300; t++) {
        sampler.sample(rng, "nb", t, nominal, th, sc);
        ev.evaluate(th, out);
        let best = 0;
        for (let i = 1; i < wl.length; i++) if (T[i]! > T[best]!) best = i;
        centres.push(wl[best]!);
      }
      const mean = centres.reduce((a, b) => a + b, 0) / centres.length;
      return Math.sqrt(centres.reduce((a, b) => a + (b - mean) ** 2, 0) / centres.length);
    };
    const sInd = centreSigma(independent);
    const sMon = centreSigma(monitored);
    expect(sInd).toBeGreaterThan(1); // 1 nm per layer moves the peak by nanometres
    expect(sMon).toBeLessThanOrEqual(sInd / 5);
  }, 60000);

  it("level monitoring of non-quarter-wave layers on the part carries each layer's error into the next (strong layer-to-layer correlation), unlike a fresh witness chip per layer (Macleod, monitoring chapter: level monitoring does not compensate)", () => {
    const design = qwotDesign([["H230", 0.6], ["L138", 1.3], ["H230", 0.7], ["L138", 0.9], ["H230", 1.4], ["L138", 0.5], ["H230", 0.8], ["L138", 1.2]]);
    const plan = (on: "part" | "witness") => design.layers.map(() => ({ wavelength: 550, on, criterion: "level" as const }));
    const control = { method: "optical" as const, signal: "T" as const, noisePct: 0.5, driftPct: 0, overshootNm: 0, overshootSigmaNm: 0 };
    const onPart = processErrorStats(design, { thickness: noErrors, process: { version: 1, control, plan: plan("part") } }, 2000, "lv");
    const onChips = processErrorStats(design, { thickness: noErrors, process: { version: 1, control, plan: plan("witness"), witness: { everyLayers: 1 } } }, 2000, "lv");
    const meanAbs = (s: typeof onPart) => s.slice(1).reduce((a, x) => a + Math.abs(x.correlationWithPrevious), 0) / (s.length - 1);
    // fresh chip per layer: each cut is independent (|r| within sampling noise, ~ 1/√2000 ≈ 0.02)
    expect(meanAbs(onChips)).toBeLessThan(0.06);
    // on the part: a layer's error moves the start of the next layer's signal, so the errors are linked
    expect(meanAbs(onPart)).toBeGreaterThan(0.3);
  });
});

describe("process model: time and crystal control", () => {
  it("crystal control with only a tooling error reproduces the per-material systematic model in distribution (two-sample KS at α = 0.01; Massey, JASA 46, 1951)", () => {
    const design = qwotDesign([["H230", 1], ["L138", 1], ["H230", 0.6], ["L138", 1.3]]);
    const N = 3000;
    const crystal = builds(design, { thickness: noErrors, process: { version: 1, control: { method: "crystal", toolingPct: 0.8, noisePct: 0, terminationNm: 0 } } }, N, "a");
    const sys = createTrialSampler({ thickness: noErrors, systematicPct: 0.8 }, design.layers.map((l) => l.material));
    const rng = new TrialRandom();
    const nominal = Float64Array.from(design.layers, (l) => l.thickness);
    const reference: Float64Array[] = [];
    for (let t = 0; t < N; t++) {
      const th = new Float64Array(4);
      sys.sample(rng, "b", t, nominal, th, new Float64Array(4));
      reference.push(th);
    }
    const ks = (a: number[], b: number[]): number => {
      a.sort((x, y) => x - y);
      b.sort((x, y) => x - y);
      let i = 0;
      let j = 0;
      let d = 0;
      while (i < a.length && j < b.length) {
        if (a[i]! <= b[j]!) i++;
        else j++;
        d = Math.max(d, Math.abs(i / a.length - j / b.length));
      }
      return d;
    };
    const critical = 1.63 * Math.sqrt(2 / N); // α = 0.01
    for (const j of [0, 1, 2, 3]) {
      const d = ks(crystal.map((t) => t[j]! / nominal[j]! - 1), reference.map((t) => t[j]! / nominal[j]! - 1));
      expect(d).toBeLessThan(critical);
    }
    // same material, same run: the tooling error is shared exactly (layers 0 and 2 scale together)
    for (const t of crystal.slice(0, 50)) expect(t[2]! / nominal[2]!).toBeCloseTo(t[0]! / nominal[0]!, 12);
  });

  it("time control: the first-order autoregressive rate drift gives the stated layer-to-layer correlation ρ (stationary AR(1), Box & Jenkins)", () => {
    const design = qwotDesign(Array.from({ length: 12 }, () => ["H230", 1] as [string, number]));
    const stats = processErrorStats(design, { thickness: noErrors, process: { version: 1, control: { method: "time", rateErrorPct: 0, rateDriftPct: 1, driftCorrelation: 0.8, withinLayerPct: 0, indexDriftPct: 0, shutterNm: 0 } } }, 4000, "ar");
    for (const s of stats.slice(1)) {
      expect(s.correlationWithPrevious).toBeGreaterThan(0.8 - 0.05);
      expect(s.correlationWithPrevious).toBeLessThan(0.8 + 0.05);
      expect(s.sigmaPct).toBeGreaterThan(0.95);
      expect(s.sigmaPct).toBeLessThan(1.05);
    }
  });

  it("uniformity: a part at radius r gets 1 + a·r² of the calibrated thickness (calibrated at r = 0)", () => {
    const design = qwotDesign([["H230", 1], ["L138", 1]]);
    const [th] = builds(design, { thickness: noErrors, process: { control: { method: "crystal" }, uniformity: { a: -2e-5, radiusMm: 100 } } } as ErrorModel, 1);
    design.layers.forEach((l, j) => expect(th![j]!).toBeCloseTo(l.thickness * (1 - 2e-5 * 100 * 100), 10));
  });
});

describe("process model: format", () => {
  it("an old error model stays valid and an error model carries its process", () => {
    const old = parseErrorModel({ thickness: { relativePct: 1, absoluteNm: 0.3, distribution: "normal" }, systematicPct: 0.5 });
    expect(old.process).toBeUndefined();
    const m = parseErrorModel({ ...old, process: { control: { method: "optical", noisePct: 0.5 }, plan: [{ wavelength: 905, criterion: "turning" }] } });
    expect(m.process?.version).toBe(1);
    expect(m.process?.plan?.[0]?.on).toBe("part");
    expect(() => parseErrorModel({ ...old, process: { control: { method: "plasma" } } })).toThrow(RangeError);
    expect(() => parseErrorModel({ ...old, process: { control: { method: "optical", noisePct: -1 } } })).toThrow(/noisePct/);
  });

  it("describes the process in plain words for the release record", () => {
    const text = describeProcess({ control: { method: "optical", noisePct: 0.5 }, plan: [{ wavelength: 905, criterion: "turning" }, { wavelength: 905, criterion: "turning" }] });
    expect(text).toContain("optical monitoring");
    expect(text).toContain("turning points at 905 nm on the part");
    expect(text).toContain("0.5 % photometric noise");
    expect(describeProcess({ thickness: { relativePct: 1, absoluteNm: 0.3, distribution: "normal" } })).toContain("independent thickness errors 1 %");
    expect(describeProcess({ control: { H: { method: "crystal", toolingPct: 0.4 }, L: { method: "time", rateErrorPct: 1 } } })).toMatch(/H: quartz-crystal control, tooling error 0.4 %; L: time control, rate error 1 %/);
  });

  it("scaling an error model scales the process spreads", () => {
    const m = parseErrorModel({ thickness: noErrors, process: { control: { method: "optical", noisePct: 0.5, overshootSigmaNm: 1 } } });
    const s = scaleErrorModel(m, 2);
    expect(s.process?.control).toMatchObject({ noisePct: 1, overshootSigmaNm: 2 });
  });

  it("rejects what it cannot model, naming the value", () => {
    const design = qwotDesign([["H230", 1]]);
    expect(() => createProcessSampler(parseErrorModel({ thickness: noErrors, process: { control: { L138: { method: "time" } } } }), design)).toThrow(/no control for material "H230"/);
    expect(() => createProcessSampler(parseErrorModel({ thickness: noErrors, process: { control: { method: "optical" }, plan: [] } }), design)).toThrow(/expected 1 steps/);
    expect(() => createProcessSampler(parseErrorModel({ thickness: noErrors, process: { control: { method: "optical" }, plan: [{ wavelength: 550, on: "witness", criterion: "turning" }] } }), design)).toThrow(/witness/);
    // a turning-point cut where the nominal layer does not end on a turning point (QW at 550 nm, monitored at 600 nm)
    expect(() => createProcessSampler(parseErrorModel({ thickness: noErrors, process: { control: { method: "optical" }, plan: [{ wavelength: 600, criterion: "turning" }] } }), design)).toThrow(/plan\[0\]\.criterion: the nominal layer ends 0\.083 QWOT/);
    const metal: Design = { ...design, materials: [...design.materials!, { id: "abs", name: "absorbing", model: { kind: "constant", n: 2, k: 0.1 }, role: "layer", source: "test value" }], layers: [{ material: "abs", thickness: 20 }] };
    expect(() => createProcessSampler(parseErrorModel({ thickness: noErrors, process: { control: { method: "optical" } } }), metal)).toThrow(/absorbing material "abs"/);
  });
});
