import { describe, expect, it } from "vitest";
import { createYieldRunner, mergeYieldChunks, planChunks } from "../../src/studies/montecarlo.ts";
import type { YieldChunk, YieldStudy } from "../../src/studies/montecarlo.ts";
import { compareProcesses, plateYield } from "../../src/studies/process/index.ts";
import type { ProcessModelInput } from "../../src/studies/process/index.ts";
import { qwotDesign } from "./fixtures.ts";

// Narrowband all-quarter-wave filter at 550 nm with a passband spec; common practice, no source.
const design = qwotDesign([["H230", 1], ["L138", 1], ["H230", 1], ["L138", 1], ["H230", 2], ["L138", 1], ["H230", 1], ["L138", 1], ["H230", 1]]);
const study = (process: ProcessModelInput | undefined, trials = 120): YieldStudy => ({
  design,
  mask: { bands: [{ id: "pass", start: 548, stop: 552, quantity: "T", polarization: "u", angleDeg: 0, requirement: "avgMin", value: 60 }] },
  errorModel: { thickness: { relativePct: 1, absoluteNm: 0.5, distribution: "normal" }, indexDriftPct: 0.2, ...(process ? { process } : {}) },
  trials,
  seed: "HTW-process",
  envelopeSamples: 20,
});

const processes: Record<string, ProcessModelInput> = {
  time: { control: { method: "time", rateErrorPct: 0.5, rateDriftPct: 0.8, driftCorrelation: 0.7, withinLayerPct: 0.3, indexDriftPct: 0.2, shutterNm: 0.3 } },
  crystal: { control: { method: "crystal", toolingPct: 0.6, noisePct: 0.3, terminationNm: 0.4 } },
  opticalTurning: { control: { method: "optical", noisePct: 0.5, overshootNm: 0.2, overshootSigmaNm: 0.4, driftPct: 0.1 } },
  opticalWitness: {
    control: { method: "optical", signal: "R", noisePct: 0.3 },
    plan: design.layers.map((_, j) => ({ wavelength: 550, on: j < 3 ? "part" : "witness", criterion: j < 3 ? "turning" : "level" })),
    witness: { everyLayers: 3 },
  },
  mixedWithPlate: {
    control: { H230: { method: "optical", noisePct: 0.5 }, L138: { method: "crystal", toolingPct: 0.5 } },
    uniformity: { a: -1e-5, radiusMm: { min: 0, max: 150 } },
  },
};

describe("process studies are reproducible", () => {
  for (const [name, process] of Object.entries(processes)) {
    it(`${name}: identical result for any chunking (trial i depends only on seed and i)`, () => {
      const s = study(process);
      const runner = createYieldRunner(s);
      const whole = mergeYieldChunks(s, [runner.runChunk(0, 120)]);
      const other = createYieldRunner(s); // a fresh runner, as another worker would have
      const pieces: YieldChunk[] = planChunks(120, 7).map(([a, n]) => other.runChunk(a, n)).reverse();
      const chunked = mergeYieldChunks(s, pieces);
      expect(chunked).toEqual(whole);
      // and not trivially: the process does produce errors
      expect(new Set(whole.marginHistogram.counts).size).toBeGreaterThan(1);
    });
  }

  it("compareProcesses lists yield and per-layer statistics per process, the independent model first when asked", async () => {
    const progress: number[] = [];
    const out = await compareProcesses(study(undefined, 60), [null, processes.crystal!, processes.opticalTurning!], {
      onProgress: (done, total) => progress.push(done / total),
      chunkSize: 20,
    });
    expect(out.map((e) => e.label)).toEqual([
      "independent errors",
      expect.stringContaining("quartz-crystal control") as unknown as string,
      expect.stringContaining("optical monitoring") as unknown as string,
    ]);
    for (const e of out) {
      expect(e.result.trials).toBe(60);
      expect(e.layers).toHaveLength(design.layers.length);
    }
    expect(progress.at(-1)).toBe(1);
    // turning-point monitoring of a narrowband filter keeps its passband far better than independent errors
    expect(out[2]!.result.yield).toBeGreaterThan(out[0]!.result.yield);
  });

  it("compareProcesses stops when aborted", async () => {
    const controller = new AbortController();
    const run = compareProcesses(study(undefined, 60), [null, processes.time!], {
      chunkSize: 10,
      signal: controller.signal,
      onProgress: () => controller.abort(new Error("stopped by the user")),
    });
    await expect(run).rejects.toThrow("stopped by the user");
  });

  it("plateYield: the yield across the plate falls off with radius under a 1 + a·r² profile calibrated at the centre", () => {
    const s = study({ control: { method: "optical", noisePct: 0.2 }, uniformity: { a: -2e-6, radiusMm: 0 } }, 60);
    const points = plateYield(s, [0, 200]);
    expect(points[0]!.yield).toBeGreaterThan(points[1]!.yield);
  });
});
