import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  evaluateSpec,
  largestScaleForYield,
  mergeYieldChunks,
  runYield,
  runYieldChunk,
  wilsonInterval,
  yieldSweep,
} from "../../src/studies/index.ts";
import type { YieldChunk, YieldStudy } from "../../src/studies/index.ts";
import { qwotDesign } from "./fixtures.ts";

// Quarter–half–quarter three-layer AR (M 1, H 2, L 1 QWOT at 550 nm) with a tight mask: about 40 % yield under 2 % errors.
const study = (over: Partial<YieldStudy> = {}): YieldStudy => ({
  design: qwotDesign([
    ["M170", 1],
    ["H230", 2],
    ["L138", 1],
  ]),
  mask: {
    bands: [
      {
        id: "ar",
        start: 480,
        stop: 620,
        step: 5,
        quantity: "R",
        polarization: "u",
        angleDeg: 0,
        requirement: "max",
        value: 0.3,
      },
      {
        id: "avg",
        start: 450,
        stop: 650,
        step: 10,
        quantity: "R",
        polarization: "u",
        angleDeg: 0,
        requirement: "avgMax",
        value: 0.12,
      },
      {
        id: "oblique",
        start: 500,
        stop: 600,
        step: 10,
        quantity: "T",
        polarization: "s",
        angleDeg: 30,
        requirement: "min",
        value: 99.7,
      },
    ],
  },
  errorModel: {
    thickness: { relativePct: 2, absoluteNm: 0.5, distribution: "normal" },
    systematicPct: 0.5,
    indexDriftPct: 0.5,
  },
  trials: 301,
  seed: "HTW-test-7",
  ...over,
});

describe("Monte Carlo yield", () => {
  it("gives the same result for one chunk, odd-sized chunks and reversed merge order", () => {
    const s = study();
    const one = mergeYieldChunks(s, [runYieldChunk(s, 0, 301)]);
    const sizes = [1, 7, 33, 100, 2, 97, 61];
    const chunks: YieldChunk[] = [];
    let start = 0;
    for (const n of sizes) {
      chunks.push(runYieldChunk(s, start, n));
      start += n;
    }
    expect(start).toBe(301);
    const many = mergeYieldChunks(s, chunks);
    const reversed = mergeYieldChunks(s, [...chunks].reverse());
    expect(many).toEqual(one);
    expect(reversed).toEqual(one);
    expect(JSON.stringify(reversed)).toBe(JSON.stringify(one)); // bit-identical once serialised
    // The study is not trivial: some trials pass and some fail.
    expect(one.passCount).toBeGreaterThan(0);
    expect(one.passCount).toBeLessThan(301);
    expect(one.interval).toEqual(wilsonInterval(one.passCount, 301));
    expect(one.marginHistogram.counts.reduce((a, b) => a + b, 0)).toBe(301);
    expect(one.marginHistogram.edges).toHaveLength(41);
    expect(one.criticalLayers).toHaveLength(3);
    expect(one.envelopes.map((e) => [e.quantity, e.polarization, e.angleDeg])).toEqual([
      ["R", "u", 0],
      ["T", "s", 30],
    ]);
    const env = one.envelopes[0];
    const p5 = env?.percentiles[0]?.values ?? [];
    const p95 = env?.percentiles[2]?.values ?? [];
    p5.forEach((v, i) => expect(v).toBeLessThanOrEqual(p95[i] as number));
  });

  it("runYield (async, chunked) equals the merge of one chunk and reports progress", async () => {
    const s = study({ trials: 120 });
    const progress: number[] = [];
    const res = await runYield(s, { chunkSize: 50, onProgress: (d) => progress.push(d) });
    expect(progress).toEqual([50, 100, 120]);
    expect(res).toEqual(mergeYieldChunks(s, [runYieldChunk(s, 0, 120)]));
  });

  it("stops when aborted", async () => {
    const controller = new AbortController();
    const run = runYield(study({ trials: 300 }), {
      chunkSize: 10,
      signal: controller.signal,
      onProgress: (d) => {
        if (d >= 20) controller.abort(new Error("stopped by user"));
      },
    });
    await expect(run).rejects.toThrow("stopped by user");
  });

  it("zero error model: yield is 1 or 0, equal to the nominal verdict", () => {
    const zero = { thickness: { relativePct: 0, absoluteNm: 0, distribution: "normal" as const } };
    const s = study({ errorModel: zero, trials: 20 });
    const nominal = evaluateSpec(s.design as never, s.mask);
    const res = mergeYieldChunks(s, [runYieldChunk(s, 0, 20)]);
    expect(res.yield).toBe(nominal.pass ? 1 : 0);
    expect(res.nominal.pass).toBe(nominal.pass);
    // A mask the nominal design fails: yield 0.
    const failing = study({
      errorModel: zero,
      trials: 20,
      mask: { bands: [{ ...s.mask.bands[0]!, value: 0.01 }] },
    });
    expect(mergeYieldChunks(failing, [runYieldChunk(failing, 0, 20)]).yield).toBe(0);
  });

  it("a tolerance sweep falls (close to monotone) as every σ grows", () => {
    const points = yieldSweep(study({ trials: 200 }), [0, 0.5, 1, 1.5, 2, 3]);
    expect(points[0]?.yield).toBe(1);
    for (let i = 1; i < points.length; i++) {
      // common random numbers: allow at most a 2 % upward wiggle
      expect(points[i]!.yield).toBeLessThanOrEqual(points[i - 1]!.yield + 0.02);
    }
    expect(points[points.length - 1]!.yield).toBeLessThan(points[1]!.yield);
    const at = largestScaleForYield(points, 0.9);
    expect(at.scale).not.toBeNull();
    const idx = points.findIndex((p) => p.scale === at.scale);
    expect(points[idx]!.yield).toBeGreaterThanOrEqual(0.9);
    expect(at.interpolated!).toBeGreaterThanOrEqual(at.scale!);
  });

  it("ranks layers by the correlation of their errors with failure, strongest first", () => {
    const res = mergeYieldChunks(study(), [runYieldChunk(study(), 0, 301)]);
    const score = (l: (typeof res.criticalLayers)[number]) =>
      Math.max(Math.abs(l.correlation), Math.abs(l.absErrorCorrelation));
    expect(score(res.criticalLayers[0]!)).toBeGreaterThan(0.2);
    for (let i = 1; i < res.criticalLayers.length; i++)
      expect(score(res.criticalLayers[i]!)).toBeLessThanOrEqual(score(res.criticalLayers[i - 1]!));
    res.criticalLayers.forEach((l) => expect(Math.abs(l.correlation)).toBeLessThanOrEqual(1));
  });

  it("rejects bad input with a RangeError naming the value", () => {
    expect(() => runYieldChunk(study({ trials: 0 }), 0, 1)).toThrow(/study\.trials: .*got 0/);
    expect(() => runYieldChunk(study({ trials: 300000 }), 0, 1)).toThrow(/study\.trials: .*got 300000/);
    expect(() => runYieldChunk(study(), 300, 5)).toThrow(/count must be an integer in 1\.\.1, got 5/);
    expect(() => runYieldChunk(study({ seed: "" }), 0, 1)).toThrow(/study\.seed/);
    const s = study({ trials: 10 });
    expect(() => mergeYieldChunks(s, [runYieldChunk(s, 0, 5)])).toThrow(/cover 5 trials, study has 10/);
    expect(() => mergeYieldChunks(s, [runYieldChunk(s, 0, 5), runYieldChunk(s, 4, 6)])).toThrow(
      /starting at trial 5, got 4/,
    );
    const other = study({ trials: 10, seed: "HTW-other" });
    expect(() => mergeYieldChunks(s, [runYieldChunk(other, 0, 10)])).toThrow(/belongs to seed "HTW-other"/);
    const badMaterial = study();
    (badMaterial.design as { layers: { material: string; thickness: number }[] }).layers[0]!.material =
      "unobtainium";
    expect(() => runYieldChunk(badMaterial, 0, 1)).toThrow(
      /study\.design\.layers\[0\]\.material.*"unobtainium"/,
    );
  });
});

describe("Monte Carlo result shape", () => {
  it("is plain JSON: survives a JSON round trip unchanged, and envelopeSamples: 0 gives no envelopes", () => {
    const s = study({ trials: 40, envelopeSamples: 0 });
    const res = mergeYieldChunks(s, [runYieldChunk(s, 0, 40)]);
    expect(res.envelopes).toEqual([]);
    expect(JSON.parse(JSON.stringify(res))).toEqual(res);
    const chunk = runYieldChunk(study({ trials: 40 }), 0, 40);
    expect(JSON.parse(JSON.stringify(chunk))).toEqual(chunk);
    expect(chunk.envelopeSamples).toHaveLength(40);
  });
});

describe("Monte Carlo chunking (property)", () => {
  it("any split of the trials into chunks, merged in any order, gives the same result", () => {
    const s = study({ trials: 64 });
    const reference = JSON.stringify(mergeYieldChunks(s, [runYieldChunk(s, 0, 64)]));
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 1, max: 63 }), { maxLength: 8 }),
        fc.integer(),
        (cuts, shuffleSeed) => {
          const edges = [...new Set([0, ...cuts, 64])].sort((a, b) => a - b);
          const chunks = edges
            .slice(1)
            .map((end, k) => runYieldChunk(s, edges[k] as number, end - (edges[k] as number)));
          // deterministic shuffle of the merge order
          const order = chunks
            .map((c, k) => ({ c, key: Math.sin(shuffleSeed + k * 7.1) }))
            .sort((a, b) => a.key - b.key)
            .map((x) => x.c);
          expect(JSON.stringify(mergeYieldChunks(s, order))).toBe(reference);
        },
      ),
      { numRuns: 12, seed: 20261201 },
    );
  });
});

describe("Monte Carlo warnings", () => {
  it("names error-model materials that no layer uses (a typo would silently drop an error term)", () => {
    const s = study({
      trials: 5,
      errorModel: {
        thickness: { relativePct: 1, absoluteNm: 0, distribution: "normal" },
        systematicPct: { H230: 0.5, H203: 0.5 },
      },
    });
    const res = mergeYieldChunks(s, [runYieldChunk(s, 0, 5)]);
    expect(res.warnings).toEqual(['errorModel.systematicPct names material "H203", which no layer uses']);
  });
});
