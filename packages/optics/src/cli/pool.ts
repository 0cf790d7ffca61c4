// Node-only: Stackproof's one worker-thread pool (piscina) and whole-study runs on it. Kept out of src/studies so
// the browser bundle never sees node: modules. The API and the CLI both use createNodePool.
import { createRequire } from "node:module";
import { availableParallelism } from "node:os";
import { pathToFileURL } from "node:url";
import { Piscina } from "piscina";
import { mergeYieldChunks, parseYieldStudy, planChunks } from "../studies/index.ts";
import type { YieldChunk, YieldResult, YieldStudy } from "../studies/index.ts";
import type { PoolResults, PoolTask } from "./pool-worker.ts";
import { createFairScheduler } from "./scheduler.ts";

export type { PoolTask, PoolResults } from "./pool-worker.ts";
export { createFairScheduler, type FairRun, type FairScheduler } from "./scheduler.ts";

/** Trials per chunk: about 50 ms of one thread, so a run waits at most that long for another and stops within it. */
export const FAIR_CHUNK_TRIALS = 250;

/** Number of worker threads worth starting on this machine. */
export function defaultWorkerCount(): number {
  return Math.max(1, availableParallelism());
}

/**
 * execArgv for a worker whose task file is TypeScript source (dev and tests): tsx's loader, resolved from this
 * package so it works from any working directory. Compiled task files (the API's dist/) need none.
 */
export function workerExecArgv(filename: string): string[] {
  if (!filename.endsWith(".ts")) return [];
  const loader = createRequire(import.meta.url).resolve("tsx");
  return ["--import", pathToFileURL(loader).href];
}

/** The pool: typed task runners over piscina. */
export interface NodePool {
  readonly threads: number;
  run<K extends PoolTask["kind"]>(task: Extract<PoolTask, { kind: K }>): Promise<PoolResults[K]>;
  /** Tasks queued behind busy threads. */
  readonly queued: number;
  /** Waits for running tasks, then stops the threads. */
  close(): Promise<void>;
}

/**
 * Start a pool of `threads` worker threads, all started at once and kept (a thread's start and JIT warm-up would
 * otherwise land on the first request); `warm: false` starts them on first use instead (tests). `filename` is the task module (default: this package's pool-worker.ts; a
 * bundle passes its compiled copy).
 */
export function createNodePool(options: { threads: number; filename?: string; warm?: boolean }): NodePool {
  const { threads } = options;
  if (!Number.isInteger(threads) || threads < 1 || threads > 64)
    throw new RangeError(`workers must be an integer in 1..64, got ${threads}`);
  const filename = options.filename ?? new URL("./pool-worker.ts", import.meta.url).href;
  const piscina = new Piscina({
    filename,
    minThreads: options.warm === false ? 0 : threads,
    maxThreads: threads,
    idleTimeout: Infinity,
    execArgv: workerExecArgv(filename),
  });
  return {
    threads,
    run: (task) => piscina.run(task),
    get queued() {
      return piscina.queueSize;
    },
    async close() {
      await piscina.close();
    },
  };
}

/** Options of one pooled study. */
export interface PoolRunOptions {
  /** Trials per chunk (default {@link FAIR_CHUNK_TRIALS}). */
  chunkSize?: number;
  onProgress?: (done: number, total: number) => void;
  /** Checked between chunks; the run rejects with the signal's reason. */
  signal?: AbortSignal;
}

/** Whole studies on a pool; concurrent runs share the threads fairly. */
export interface YieldPool {
  readonly size: number;
  /** Run a whole study. Same result as a single-threaded run. */
  run(study: YieldStudy, options?: PoolRunOptions): Promise<YieldResult>;
  close(): Promise<void>;
}

/** A pool of `size` threads for whole studies (the CLI and the benchmark). */
export function createYieldPool(size: number): YieldPool {
  const pool = createNodePool({ threads: size });
  const scheduler = createFairScheduler(size);
  let next = 1;
  return {
    size,
    async run(studyInput, options = {}) {
      const study = parseYieldStudy(studyInput);
      options.signal?.throwIfAborted();
      const key = `study-${next++}`;
      const chunks: YieldChunk[] = [];
      let done = 0;
      let failure: unknown = null;
      await new Promise<void>((resolve) => {
        const onAbort = () => void scheduler.stop(key);
        options.signal?.addEventListener("abort", onAbort, { once: true });
        scheduler.add<YieldChunk>({
          id: key,
          pending: planChunks(study.trials, options.chunkSize ?? FAIR_CHUNK_TRIALS),
          exec: (start, count) => pool.run({ kind: "chunk", key, study, start, count }),
          onChunk(chunk) {
            chunks.push(chunk);
            done += chunk.count;
            options.onProgress?.(done, study.trials);
          },
          onError(error) {
            failure = error;
          },
          onSettled() {
            options.signal?.removeEventListener("abort", onAbort);
            resolve();
          },
        });
      });
      if (failure) throw failure;
      options.signal?.throwIfAborted();
      return mergeYieldChunks(study, chunks);
    },
    close: () => pool.close(),
  };
}

/** One-off pooled run: start `workers` threads, run the study, stop the threads. */
export async function runYieldWithWorkers(
  study: YieldStudy,
  options: PoolRunOptions & { workers: number },
): Promise<YieldResult> {
  const pool = createYieldPool(options.workers);
  try {
    return await pool.run(study, options);
  } finally {
    await pool.close();
  }
}
