// Monte Carlo worker: one of the page's warm pool. Keeps the compiled runner of each study it is working on (the
// pool may interleave two studies), runs the chunks of trials the pool hands it.
import * as Comlink from "comlink";
import { createYieldRunner, yieldSweep } from "@stackproof/optics";
import type { SweepPoint, YieldChunk, YieldRunner, YieldStudy } from "@stackproof/optics";

const runners = new Map<number, YieldRunner>();

const api = {
  init(key: number, study: YieldStudy): number {
    const runner = createYieldRunner(study);
    runners.set(key, runner);
    return runner.study.trials;
  },
  runChunk(key: number, startTrial: number, count: number): YieldChunk {
    const runner = runners.get(key);
    if (!runner) throw new Error("yield worker: init() the study first");
    return runner.runChunk(startTrial, count);
  },
  release(key: number): void {
    runners.delete(key);
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
