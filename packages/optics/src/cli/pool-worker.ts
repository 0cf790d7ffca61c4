// The one worker-thread task module of Stackproof's Node pool (piscina): yield chunks, merges and nominal spec
// evaluations. Used by the CLI and the API (threads, and the API's Redis worker processes). No I/O here.
import { createYieldRunner, evaluateSpec, mergeYieldChunks } from "../studies/index.ts";
import type {
  SpecMask,
  SpecResult,
  YieldChunk,
  YieldResult,
  YieldRunner,
  YieldStudy,
} from "../studies/index.ts";
import type { Design } from "../core/index.ts";

/** A unit of work for the pool. `key` names the study so that consecutive chunks reuse its compiled runner. */
export type PoolTask =
  | { kind: "chunk"; key: string; study: YieldStudy; start: number; count: number }
  | { kind: "merge"; study: YieldStudy; chunks: YieldChunk[] }
  | { kind: "spec"; design: Design; mask: SpecMask };

/** What each task kind answers. */
export interface PoolResults {
  chunk: YieldChunk;
  merge: YieldResult;
  spec: SpecResult;
}

// Compiled runners of the studies this thread saw last (a few interleaved runs share a thread under fair scheduling).
const RUNNER_CACHE = 8;
const runners = new Map<string, YieldRunner>();

function runnerFor(key: string, study: YieldStudy): YieldRunner {
  let runner = runners.get(key);
  if (runner) {
    runners.delete(key); // re-insert as most recently used
  } else {
    runner = createYieldRunner(study);
    if (runners.size >= RUNNER_CACHE) runners.delete(runners.keys().next().value as string);
  }
  runners.set(key, runner);
  return runner;
}

/** Runs one task (the default export is what piscina calls). Invalid input throws RangeError. */
export function runPoolTask(task: PoolTask): YieldChunk | YieldResult | SpecResult {
  switch (task.kind) {
    case "chunk":
      return runnerFor(task.key, task.study).runChunk(task.start, task.count);
    case "merge":
      return mergeYieldChunks(task.study, task.chunks);
    case "spec":
      return evaluateSpec(task.design, task.mask);
    default:
      throw new RangeError(`unknown pool task ${JSON.stringify((task as { kind?: unknown }).kind)}`);
  }
}

export default runPoolTask;
