// The Node worker-thread pool with real threads: results equal the single-thread merge, runs reuse the pool.
import { describe, expect, it } from "vitest";
import { createYieldPool } from "../../src/cli/pool.ts";
import { mergeYieldChunks, runYieldChunk } from "../../src/studies/index.ts";
import type { YieldStudy } from "../../src/studies/index.ts";
import { htwAr4 } from "./fixtures.ts";

const study = (seed: string, trials: number): YieldStudy => ({
  design: htwAr4(),
  mask: {
    bands: [
      {
        id: "vis",
        start: 430,
        stop: 670,
        step: 5,
        quantity: "R",
        polarization: "u",
        angleDeg: 0,
        requirement: "max",
        value: 0.6,
      },
    ],
  },
  errorModel: { thickness: { relativePct: 1, absoluteNm: 0.3, distribution: "normal" }, indexDriftPct: 0.3 },
  trials,
  seed,
});

describe("createYieldPool", { timeout: 60_000 }, () => {
  it("runs several studies on the same threads with results identical to one thread", async () => {
    const pool = createYieldPool(2);
    try {
      const a = study("HTW-pool-a", 150);
      const b = study("HTW-pool-b", 97);
      const progress: number[] = [];
      const ra = await pool.run(a, { chunkSize: 20, onProgress: (d) => progress.push(d) });
      const rb = await pool.run(b, { chunkSize: 13 });
      expect(ra).toEqual(mergeYieldChunks(a, [runYieldChunk(a, 0, 150)]));
      expect(rb).toEqual(mergeYieldChunks(b, [runYieldChunk(b, 0, 97)]));
      expect(progress[progress.length - 1]).toBe(150);
      await expect(pool.run({ ...a, trials: -1 })).rejects.toThrow(/study\.trials: .*got -1/);
      const controller = new AbortController();
      controller.abort(new Error("cancelled by reviewer"));
      await expect(pool.run(a, { signal: controller.signal })).rejects.toThrow("cancelled by reviewer");
      // the pool still works after a rejected run
      expect(await pool.run(b, { chunkSize: 50 })).toEqual(rb);
    } finally {
      await pool.close();
    }
  });
});
