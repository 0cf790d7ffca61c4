// Browser benchmark worker: compiles the study once, runs the chunks it is sent.
import { createYieldRunner } from "../../src/studies/index.ts";
import type { YieldRunner } from "../../src/studies/index.ts";
import { conditionsStudy } from "../conditions-study.ts";

let runner: YieldRunner | undefined;
let runnerTrials = 0;
self.onmessage = (e: MessageEvent<{ trials: number; start: number; count: number }>) => {
  const { trials, start, count } = e.data;
  if (!runner || runnerTrials !== trials) {
    runner = createYieldRunner(conditionsStudy(trials, true));
    runnerTrials = trials;
  }
  const c = runner.runChunk(start, count);
  (self as unknown as Worker).postMessage({ passCount: c.passCount });
};
