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
  resolveControl,
} from "../../src/studies/process/index.ts";
import type { Control } from "../../src/studies/process/index.ts";
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
    const model: ErrorModel = {
      thickness: noErrors,
      process: {
        version: 1,
        control: {
          method: "optical",
          signal: "T",
          noisePct: 0,
          driftPct: 0,
          overshootNm: 0,
          overshootSigmaNm: 0,
        },
      },
    };
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
    const design = qwotDesign([
      ["H230", 0.6],
      ["L138", 1.3],
      ["H230", 0.7],
    ]);
    const model: ErrorModel = {
      thickness: noErrors,
      process: {
        version: 1,
        control: {
          method: "optical",
          signal: "T",
          noisePct: 0,
          driftPct: 0,
          overshootNm: 0,
          overshootSigmaNm: 0,
        },
        plan: design.layers.map(() => ({ wavelength: 633, on: "part", criterion: "level" })),
      },
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
    const design = qwotDesign([
      ["H230", 1],
      ["L138", 1],
      ["H230", 0.6],
      ["L138", 1.3],
      ["H230", 2],
      ["L138", 0.8],
    ]);
    const plan = defaultMonitoringPlan(design);
    // layer 4 is a half wave but sits on a stack whose admittance is not real: its end is no turning point
    expect(plan.map((p) => p.criterion)).toEqual(["turning", "turning", "level", "level", "level", "level"]);
    const processes = [
      { control: { method: "time" } },
      { control: { method: "crystal" } },
      { control: { method: "optical" } },
      {
        control: { method: "optical", signal: "R" },
        plan: plan.map((p, j) =>
          j % 2 && j > 1
            ? { wavelength: 600, on: "witness", criterion: "level" }
            : { ...p, on: j % 2 ? "witness" : "part" },
        ),
        witness: { everyLayers: 2 },
      },
      {
        control: { H230: { method: "optical" }, L138: { method: "crystal" } },
        uniformity: { a: -1e-5, radiusMm: 0 },
      },
    ];
    for (const process of processes) {
      const [th] = builds(
        design,
        {
          thickness: { relativePct: 3, absoluteNm: 1, distribution: "normal" },
          systematicPct: 2,
          process,
        } as ErrorModel,
        1,
      );
      design.layers.forEach((l, j) => expect(Math.abs(th![j]! - l.thickness)).toBeLessThan(1e-6));
    }
  });

  it("narrowband all-quarter-wave filter, turning points at its centre wavelength: centre-wavelength σ ≤ 1/5 of the independent model's with the same termination errors (Macleod, Optica Acta 19, 1972)", () => {
    const H = "H230";
    const Lo = "L138";
    const design = qwotDesign([
      [H, 1],
      [Lo, 1],
      [H, 1],
      [Lo, 1],
      [H, 1],
      [Lo, 1],
      [H, 2],
      [Lo, 1],
      [H, 1],
      [Lo, 1],
      [H, 1],
      [Lo, 1],
      [H, 1],
    ]);
    const independent: ErrorModel = { thickness: { relativePct: 0, absoluteNm: 1, distribution: "normal" } };
    const monitored: ErrorModel = {
      ...independent,
      process: {
        version: 1,
        control: {
          method: "optical",
          signal: "T",
          noisePct: 0,
          driftPct: 0,
          overshootNm: 0,
          overshootSigmaNm: 1,
        },
      },
    };
    const wl = Array.from({ length: 801 }, (_, i) => 510 + i * 0.1);
    const centreSigma = (model: ErrorModel): number => {
      const sampler = model.process
        ? createProcessSampler(model, design)
        : createTrialSampler(
            model,
            design.layers.map((l) => l.material),
          );
      const rng = new TrialRandom();
      const nominal = Float64Array.from(design.layers, (l) => l.thickness);
      const th = new Float64Array(nominal.length);
      const sc = new Float64Array(nominal.length);
      const centres: number[] = [];
      const ev = createStackEvaluator(design, { wavelengths: wl, angleDeg: 0, polarization: "s" });
      const out = {
        R: new Float64Array(wl.length),
        T: new Float64Array(wl.length),
        A: new Float64Array(wl.length),
      };
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
});

// Level monitoring on the part (Macleod, Thin-Film Optical Filters, monitoring chapter): every level cut stops
// where the part's signal reaches the nominal stack's value, so it pins the signal S at the monitoring
// wavelength but not the rest of the stack's state. Each layer's error therefore moves where the next layer
// must stop. To first order (a derivation from the cut condition S_j(d_1 … d_j) = S*_j + noise, checked here
// against the simulation):
//   δ_j = −(Σ_{k<j} ∂S_j/∂d_k · δ_k + ε_j) / (∂S_j/∂d_j),
// so the sign of the correlation of consecutive errors depends on the slopes of the signals at the cuts: it is
// a property of the design and the monitoring wavelength, not of level monitoring as such.
describe("process model: level monitoring on the part carries errors from layer to layer", () => {
  const levelModel = (
    design: Design,
    wavelength: number,
    on: "part" | "witness",
    noisePct: number,
  ): ErrorModel => ({
    thickness: noErrors,
    process: {
      version: 1,
      control: { method: "optical", signal: "T", noisePct, driftPct: 0, overshootNm: 0, overshootSigmaNm: 0 },
      plan: design.layers.map(() => ({ wavelength, on, criterion: "level" as const })),
      ...(on === "witness" ? { witness: { everyLayers: 1 } } : {}),
    },
  });

  /**
   * First-order propagation of the level cuts (the formula above), computed independently of the sampler:
   * ∂S_j/∂d_k by central differences of computeSpectrum of the partial stack (front surface only, normal
   * incidence, as the monitor sees it), ε_j of σ = noise·S*_j. Returns the correlation of each layer's error
   * with the previous layer's.
   */
  function firstOrderCorrelations(design: Design, wavelength: number, noise: number): number[] {
    const d0 = design.layers.map((l) => l.thickness);
    const S = (d: number[], j: number): number =>
      computeSpectrum(
        { ...design, layers: design.layers.slice(0, j + 1).map((l, k) => ({ ...l, thickness: d[k]! })) },
        { wavelengths: [wavelength], angleDeg: 0 },
      ).u.T[0]!;
    const L = d0.length;
    // δ = A ε: row j of A gives layer j's error in terms of the independent noises ε
    const A: number[][] = [];
    for (let j = 0; j < L; j++) {
      const grad = d0.slice(0, j + 1).map((_, k) => {
        const p = [...d0];
        const m = [...d0];
        p[k]! += 1e-3;
        m[k]! -= 1e-3;
        return (S(p, j) - S(m, j)) / 2e-3;
      });
      const row = new Array<number>(L).fill(0);
      row[j] = (-noise * S(d0, j)) / grad[j]!;
      for (let k = 0; k < j; k++) for (let i = 0; i < L; i++) row[i]! += (-grad[k]! / grad[j]!) * A[k]![i]!;
      A.push(row);
    }
    const cov = (a: number, b: number) => A[a]!.reduce((s, v, i) => s + v * A[b]![i]!, 0);
    return d0.map((_, j) => (j === 0 ? 0 : cov(j, j - 1) / Math.sqrt(cov(j, j) * cov(j - 1, j - 1))));
  }

  /** Share of the variance of layer j's realised error explained by least squares on layers 0 … j−1 (R²). */
  function carriedShare(errors: number[][], j: number): number {
    const p = j + 1;
    const A = Array.from({ length: p }, () => new Array<number>(p).fill(0));
    const b = new Array<number>(p).fill(0);
    for (const e of errors) {
      const x = [1, ...e.slice(0, j)];
      for (let a = 0; a < p; a++) {
        b[a]! += x[a]! * e[j]!;
        for (let c = 0; c < p; c++) A[a]![c]! += x[a]! * x[c]!;
      }
    }
    // normal equations by Gaussian elimination with partial pivoting (p ≤ 8)
    for (let a = 0; a < p; a++) {
      let m = a;
      for (let r = a + 1; r < p; r++) if (Math.abs(A[r]![a]!) > Math.abs(A[m]![a]!)) m = r;
      [A[a], A[m]] = [A[m]!, A[a]!];
      [b[a], b[m]] = [b[m]!, b[a]!];
      for (let r = a + 1; r < p; r++) {
        const f = A[r]![a]! / A[a]![a]!;
        for (let c = a; c < p; c++) A[r]![c]! -= f * A[a]![c]!;
        b[r]! -= f * b[a]!;
      }
    }
    const beta = new Array<number>(p).fill(0);
    for (let a = p - 1; a >= 0; a--) {
      let s = b[a]!;
      for (let c = a + 1; c < p; c++) s -= A[a]![c]! * beta[c]!;
      beta[a] = s / A[a]![a]!;
    }
    const y = errors.map((e) => e[j]!);
    const mean = y.reduce((s, v) => s + v, 0) / y.length;
    let ssr = 0;
    let sst = 0;
    errors.forEach((e, i) => {
      const fit = beta[0]! + e.slice(0, j).reduce((s, v, a) => s + v * beta[a + 1]!, 0);
      ssr += (y[i]! - fit) ** 2;
      sst += (y[i]! - mean) ** 2;
    });
    return 1 - ssr / sst;
  }

  // 8 non-quarter-wave layers (0.5–1.4 QWOT at 550 nm), every layer cut at a level at 550 nm
  const design8 = qwotDesign([
    ["H230", 0.6],
    ["L138", 1.3],
    ["H230", 0.7],
    ["L138", 0.9],
    ["H230", 1.4],
    ["L138", 0.5],
    ["H230", 0.8],
    ["L138", 1.2],
  ]);

  it("what accumulates: on the part a large and growing share of each layer's error is carried from the layers below it (R² of a regression on their errors), on a fresh witness chip per layer none is", () => {
    const relErrors = (model: ErrorModel) =>
      builds(design8, model, 2000, "lv").map((th) =>
        Array.from(th, (d, j) => d / design8.layers[j]!.thickness - 1),
      );
    const part = relErrors(levelModel(design8, 550, "part", 0.5));
    const chips = relErrors(levelModel(design8, 550, "witness", 0.5));
    const onPart = design8.layers.map((_, j) => (j === 0 ? 0 : carriedShare(part, j)));
    const onChips = design8.layers.map((_, j) => (j === 0 ? 0 : carriedShare(chips, j)));
    // fresh chip per layer: nothing is carried (R² of j regressors on 2000 independent draws ≈ j/2000)
    for (const r2 of onChips.slice(1)) expect(r2).toBeLessThan(0.02);
    // on the part every layer carries a fifth or more of its error variance from below (0.23–0.93 here) …
    for (const r2 of onPart.slice(1)) expect(r2).toBeGreaterThan(0.2);
    // … and the carried share grows up the stack: mean 0.51 over layers 2–4, 0.64 over layers 5–8
    const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;
    expect(mean(onPart.slice(4))).toBeGreaterThan(mean(onPart.slice(1, 4)) + 0.05);
    // the photometer does not see what is carried: after every layer the part's T at 550 nm stays within its
    // noise of the nominal value (σ ≈ 0.5 % of the signal), while the layer errors pile up (reference:
    // computeSpectrum of the built partial stack)
    const partial = (th: ArrayLike<number>, j: number) =>
      computeSpectrum(
        { ...design8, layers: design8.layers.slice(0, j + 1).map((l, k) => ({ ...l, thickness: th[k]! })) },
        { wavelengths: [550], angleDeg: 0 },
      ).u.T[0]!;
    const nominalT = design8.layers.map((l, j) =>
      partial(
        design8.layers.map((x) => x.thickness),
        j,
      ),
    );
    const sample = builds(design8, levelModel(design8, 550, "part", 0.5), 300, "lv");
    design8.layers.forEach((_, j) => {
      const sd = Math.sqrt(
        sample.reduce((s, th) => s + (partial(th, j) - nominalT[j]!) ** 2, 0) / sample.length,
      );
      expect(sd).toBeLessThan(1.25 * 0.005 * nominalT[j]!);
    });
  });

  it("the sign of the layer-to-layer correlation is a property of the design and wavelength: first-order propagation of the cuts reproduces the simulated correlations, mostly negative (partial compensation) in the 8-layer design at 550 nm", () => {
    const sim = processErrorStats(design8, levelModel(design8, 550, "part", 0.1), 4000, "sign").map(
      (s) => s.correlationWithPrevious,
    );
    const theory = firstOrderCorrelations(design8, 550, 0.001);
    for (let j = 1; j < sim.length; j++) expect(Math.abs(sim[j]! - theory[j]!)).toBeLessThan(0.06);
    // −0.48, +0.15, −0.32, +0.47, −0.78, −0.56, −0.53: five of seven negative, and not all of one sign
    expect(sim.slice(1).filter((r) => r < -0.2).length).toBeGreaterThanOrEqual(5);
    expect(sim.slice(1).some((r) => r > 0.3)).toBe(true);
  });

  it("a realistic case with positively correlated consecutive errors: the four-layer visible AR of docs/examples (Ta2O5 / SiO2 / Ta2O5 / MgF2 on crown glass) level-monitored on the part at 430 nm, as first-order propagation predicts", () => {
    // docs/examples/four-layer-visible-ar.json; the monitor sees the front surface only, so no back surface here
    const ar: Design = {
      format: "stackproof.design/v1",
      name: "four-layer visible AR",
      referenceWavelength: 550,
      incident: "air",
      exit: "air",
      layers: [
        { material: "Ta2O5", thickness: 12.81 },
        { material: "SiO2", thickness: 36.91 },
        { material: "Ta2O5", thickness: 127.78 },
        { material: "MgF2", thickness: 94.43 },
      ],
      substrate: { material: "boro-crown", thicknessMm: 2, backside: false },
    };
    const model = levelModel(ar, 430, "part", 0.1);
    const sim = processErrorStats(ar, model, 4000, "ar430");
    const theory = firstOrderCorrelations(ar, 430, 0.001);
    // simulated +0.69, +0.88, +0.25; theory +0.67, +0.88, +0.28
    for (let j = 1; j < 4; j++) {
      expect(sim[j]!.correlationWithPrevious).toBeGreaterThan(0.15);
      expect(Math.abs(sim[j]!.correlationWithPrevious - theory[j]!)).toBeLessThan(0.08);
    }
    // a thicker first layer (T still falling at its cut) leaves the next SiO2 layer (T rising at its cut) more
    // to undo before its level: the two errors have the same sign. Errors of 0.5–3 % for 0.1 % photometric
    // noise: thin AR layers are poorly determined by a level, which is why they are often crystal-controlled.
    expect(sim.every((s) => s.sigmaPct < 3.5)).toBe(true);
  });
});

describe("process model: time and crystal control", () => {
  it("crystal control with only a tooling error reproduces the per-material systematic model in distribution (two-sample KS at α = 0.01; Massey, JASA 46, 1951)", () => {
    const design = qwotDesign([
      ["H230", 1],
      ["L138", 1],
      ["H230", 0.6],
      ["L138", 1.3],
    ]);
    const N = 3000;
    const crystal = builds(
      design,
      {
        thickness: noErrors,
        process: {
          version: 1,
          control: { method: "crystal", toolingPct: 0.8, noisePct: 0, terminationNm: 0 },
        },
      },
      N,
      "a",
    );
    const sys = createTrialSampler(
      { thickness: noErrors, systematicPct: 0.8 },
      design.layers.map((l) => l.material),
    );
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
      const d = ks(
        crystal.map((t) => t[j]! / nominal[j]! - 1),
        reference.map((t) => t[j]! / nominal[j]! - 1),
      );
      expect(d).toBeLessThan(critical);
    }
    // same material, same run: the tooling error is shared exactly (layers 0 and 2 scale together)
    for (const t of crystal.slice(0, 50)) expect(t[2]! / nominal[2]!).toBeCloseTo(t[0]! / nominal[0]!, 12);
  });

  it("time control: the first-order autoregressive rate drift gives the stated layer-to-layer correlation ρ (stationary AR(1), Box & Jenkins)", () => {
    const design = qwotDesign(Array.from({ length: 12 }, () => ["H230", 1] as [string, number]));
    const stats = processErrorStats(
      design,
      {
        thickness: noErrors,
        process: {
          version: 1,
          control: {
            method: "time",
            rateErrorPct: 0,
            rateDriftPct: 1,
            driftCorrelation: 0.8,
            withinLayerPct: 0,
            indexDriftPct: 0,
            shutterNm: 0,
          },
        },
      },
      4000,
      "ar",
    );
    for (const s of stats.slice(1)) {
      expect(s.correlationWithPrevious).toBeGreaterThan(0.8 - 0.05);
      expect(s.correlationWithPrevious).toBeLessThan(0.8 + 0.05);
      expect(s.sigmaPct).toBeGreaterThan(0.95);
      expect(s.sigmaPct).toBeLessThan(1.05);
    }
  });

  it("uniformity: a part at radius r gets 1 + a·r² of the calibrated thickness (calibrated at r = 0)", () => {
    const design = qwotDesign([
      ["H230", 1],
      ["L138", 1],
    ]);
    const [th] = builds(
      design,
      {
        thickness: noErrors,
        process: { control: { method: "crystal" }, uniformity: { a: -2e-5, radiusMm: 100 } },
      } as ErrorModel,
      1,
    );
    design.layers.forEach((l, j) => expect(th![j]!).toBeCloseTo(l.thickness * (1 - 2e-5 * 100 * 100), 10));
  });
});

describe("process model: format", () => {
  it("an old error model stays valid and an error model carries its process", () => {
    const old = parseErrorModel({
      thickness: { relativePct: 1, absoluteNm: 0.3, distribution: "normal" },
      systematicPct: 0.5,
    });
    expect(old.process).toBeUndefined();
    const m = parseErrorModel({
      ...old,
      process: {
        control: { method: "optical", noisePct: 0.5 },
        plan: [{ wavelength: 905, criterion: "turning" }],
      },
    });
    // parsing keeps what was written (input and output types of an error model are the same); the
    // defaults (version 1, monitored on the part, parameters 0) are filled where the model is used
    expect(m.process?.plan?.[0]).toEqual({ wavelength: 905, criterion: "turning" });
    expect(resolveControl(m.process!.control as Control)).toMatchObject({
      method: "optical",
      signal: "T",
      noisePct: 0.5,
      driftPct: 0,
    });
    expect(() => parseErrorModel({ ...old, process: { control: { method: "plasma" } } })).toThrow(RangeError);
    expect(() =>
      parseErrorModel({ ...old, process: { control: { method: "optical", noisePct: -1 } } }),
    ).toThrow(/noisePct/);
  });

  it("describes the process in plain words for the release record", () => {
    const text = describeProcess({
      control: { method: "optical", noisePct: 0.5 },
      plan: [
        { wavelength: 905, criterion: "turning" },
        { wavelength: 905, criterion: "turning" },
      ],
    });
    expect(text).toContain("optical monitoring");
    expect(text).toContain("turning points at 905 nm on the part");
    expect(text).toContain("0.5 % photometric noise");
    expect(
      describeProcess({ thickness: { relativePct: 1, absoluteNm: 0.3, distribution: "normal" } }),
    ).toContain("independent thickness errors 1 %");
    expect(
      describeProcess({
        control: { H: { method: "crystal", toolingPct: 0.4 }, L: { method: "time", rateErrorPct: 1 } },
      }),
    ).toMatch(/H: quartz-crystal control, tooling error 0.4 %; L: time control, rate error 1 %/);
  });

  it("scaling an error model scales the process spreads", () => {
    const m = parseErrorModel({
      thickness: noErrors,
      process: { control: { method: "optical", noisePct: 0.5, overshootSigmaNm: 1 } },
    });
    const s = scaleErrorModel(m, 2);
    expect(s.process?.control).toMatchObject({ noisePct: 1, overshootSigmaNm: 2 });
  });

  it("rejects what it cannot model, naming the value", () => {
    const design = qwotDesign([["H230", 1]]);
    expect(() =>
      createProcessSampler(
        parseErrorModel({ thickness: noErrors, process: { control: { L138: { method: "time" } } } }),
        design,
      ),
    ).toThrow(/no control for material "H230"/);
    expect(() =>
      createProcessSampler(
        parseErrorModel({ thickness: noErrors, process: { control: { method: "optical" }, plan: [] } }),
        design,
      ),
    ).toThrow(/expected 1 steps/);
    expect(() =>
      createProcessSampler(
        parseErrorModel({
          thickness: noErrors,
          process: {
            control: { method: "optical" },
            plan: [{ wavelength: 550, on: "witness", criterion: "turning" }],
          },
        }),
        design,
      ),
    ).toThrow(/witness/);
    // a turning-point cut where the nominal layer does not end on a turning point (QW at 550 nm, monitored at 600 nm)
    expect(() =>
      createProcessSampler(
        parseErrorModel({
          thickness: noErrors,
          process: { control: { method: "optical" }, plan: [{ wavelength: 600, criterion: "turning" }] },
        }),
        design,
      ),
    ).toThrow(/plan\[0\]\.criterion: the nominal layer ends 0\.083 QWOT/);
    const metal: Design = {
      ...design,
      materials: [
        ...design.materials!,
        {
          id: "abs",
          name: "absorbing",
          model: { kind: "constant", n: 2, k: 0.1 },
          role: "layer",
          source: "test value",
        },
      ],
      layers: [{ material: "abs", thickness: 20 }],
    };
    expect(() =>
      createProcessSampler(
        parseErrorModel({ thickness: noErrors, process: { control: { method: "optical" } } }),
        metal,
      ),
    ).toThrow(/absorbing material "abs"/);
    // a weak absorption tail (k = 1e-5, like a titania film in the visible) is monitored as lossless
    const tail: Design = {
      ...metal,
      materials: [
        ...design.materials!,
        {
          id: "tail",
          name: "weak tail",
          model: { kind: "constant", n: 2.3, k: 1e-5 },
          role: "layer",
          source: "test value",
        },
      ],
      layers: [{ material: "tail", thickness: 550 / (4 * 2.3) }],
    };
    expect(() =>
      createProcessSampler(
        parseErrorModel({ thickness: noErrors, process: { control: { method: "optical" } } }),
        tail,
      ),
    ).not.toThrow();
  });
});
