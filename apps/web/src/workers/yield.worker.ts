// Monte Carlo worker: compiles a yield study once, then runs the chunks of trials the pool hands it.
import * as Comlink from "comlink";
import { createYieldRunner, yieldSweep } from "@stackproof/optics";
import type { SweepPoint, YieldChunk, YieldRunner, YieldStudy } from "@stackproof/optics";

let runner: YieldRunner | null = null;

const api = {
  init(study: YieldStudy): number {
    runner = createYieldRunner(study);
    return runner.study.trials;
  },
  runChunk(startTrial: number, count: number): YieldChunk {
    if (!runner) throw new Error("yield worker: init() the study first");
    return runner.runChunk(startTrial, count);
  },
  /** One point of the yield-vs-process sweep (every σ of the error model times `scale`). */
  sweepPoint(study: YieldStudy, scale: number): SweepPoint {
    const point = yieldSweep(study, [scale])[0];
    if (!point) throw new Error("yield worker: sweep returned no point");
    return point;
  },
};

export type YieldWorkerApi = typeof api;

Comlink.expose(api);
