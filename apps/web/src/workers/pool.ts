// A pool of Web Workers for Monte Carlo yield: navigator.hardwareConcurrency workers, each running
// runYieldChunk on the chunks it pulls from a shared queue; the main thread merges with mergeYieldChunks.
// Trial i depends only on (seed, i), so the merged result does not depend on the chunking or worker count.
import * as Comlink from "comlink";
import { mergeYieldChunks } from "@stackproof/optics";
import type { SweepPoint, YieldChunk, YieldResult, YieldStudy } from "@stackproof/optics";
import type { YieldWorkerApi } from "./yield.worker.ts";
import type { EngineWorkerApi } from "./engine.worker.ts";

export interface PoolProgress {
  done: number;
  total: number;
  elapsedMs: number;
  /** estimated time left, null until the first chunk is back */
  remainingMs: number | null;
  workers: number;
}

export interface PoolOptions {
  onProgress?: (p: PoolProgress) => void;
  signal?: AbortSignal;
  workers?: number;
}

interface Handle {
  worker: Worker;
  api: Comlink.Remote<YieldWorkerApi>;
}

function spawnYieldWorker(): Handle {
  const worker = new Worker(new URL("./yield.worker.ts", import.meta.url), { type: "module", name: "stackproof-yield" });
  return { worker, api: Comlink.wrap<YieldWorkerApi>(worker) };
}

export function poolSize(requested?: number): number {
  const hw = typeof navigator !== "undefined" && navigator.hardwareConcurrency ? navigator.hardwareConcurrency : 2;
  return Math.max(1, Math.min(requested ?? hw, 16));
}

function abortError(signal: AbortSignal): unknown {
  return signal.reason ?? new DOMException("The study was cancelled.", "AbortError");
}

/** Runs tasks on a set of workers, each worker pulling the next task when it is free. */
async function drain<T, R>(
  handles: Handle[],
  tasks: T[],
  run: (h: Handle, task: T) => Promise<R>,
  onResult: (r: R, task: T) => void,
  signal?: AbortSignal,
): Promise<void> {
  let next = 0;
  let failed: unknown = null;
  const stop = new Promise<never>((_, reject) => {
    signal?.addEventListener("abort", () => reject(abortError(signal)), { once: true });
  });
  const loops = handles.map(async (h) => {
    while (failed === null && next < tasks.length) {
      const task = tasks[next++] as T;
      const r = await run(h, task);
      if (signal?.aborted) return;
      onResult(r, task);
    }
  });
  await Promise.race([Promise.all(loops).catch((e: unknown) => { failed = e; throw e; }), stop]);
}

export async function runYieldInPool(study: YieldStudy, options: PoolOptions = {}): Promise<YieldResult> {
  const { signal } = options;
  signal?.throwIfAborted();
  const trials = study.trials;
  const n = Math.min(poolSize(options.workers), Math.max(1, Math.ceil(trials / 25)));
  // Several chunks per worker so progress moves and a slow worker does not hold up the end.
  const chunkSize = Math.max(25, Math.min(2000, Math.ceil(trials / (n * 8))));
  const tasks: [number, number][] = [];
  for (let s = 0; s < trials; s += chunkSize) tasks.push([s, Math.min(chunkSize, trials - s)]);
  const handles = Array.from({ length: n }, spawnYieldWorker);
  const started = performance.now();
  const chunks: YieldChunk[] = [];
  let done = 0;
  const report = () => {
    const elapsedMs = performance.now() - started;
    options.onProgress?.({ done, total: trials, elapsedMs, remainingMs: done > 0 ? (elapsedMs / done) * (trials - done) : null, workers: n });
  };
  try {
    report();
    await Promise.race([
      Promise.all(handles.map((h) => h.api.init(study))),
      new Promise<never>((_, reject) => signal?.addEventListener("abort", () => reject(abortError(signal)), { once: true })),
    ]);
    await drain(
      handles,
      tasks,
      (h, [s, c]) => h.api.runChunk(s, c),
      (chunk) => {
        chunks.push(chunk);
        done += chunk.count;
        report();
      },
      signal,
    );
    signal?.throwIfAborted();
    return mergeYieldChunks(study, chunks);
  } finally {
    for (const h of handles) h.worker.terminate();
  }
}

/** Yield against scale factors on the error model, one scale per task, spread over the pool. */
export async function runSweepInPool(study: YieldStudy, scales: readonly number[], options: PoolOptions = {}): Promise<SweepPoint[]> {
  const { signal } = options;
  signal?.throwIfAborted();
  const n = Math.min(poolSize(options.workers), scales.length);
  const handles = Array.from({ length: n }, spawnYieldWorker);
  const out: SweepPoint[] = [];
  const started = performance.now();
  try {
    await drain(
      handles,
      [...scales],
      (h, scale) => h.api.sweepPoint(study, scale),
      (p) => {
        out.push(p);
        const elapsedMs = performance.now() - started;
        options.onProgress?.({ done: out.length, total: scales.length, elapsedMs, remainingMs: (elapsedMs / out.length) * (scales.length - out.length), workers: n });
      },
      signal,
    );
    return out.sort((a, b) => a.scale - b.scale);
  } finally {
    for (const h of handles) h.worker.terminate();
  }
}

/** Runs one engine job in a fresh worker; aborting terminates the worker at once. */
export async function runEngineJob<R>(job: (api: Comlink.Remote<EngineWorkerApi>) => Promise<R>, signal?: AbortSignal): Promise<R> {
  signal?.throwIfAborted();
  const worker = new Worker(new URL("./engine.worker.ts", import.meta.url), { type: "module", name: "stackproof-engine" });
  const api = Comlink.wrap<EngineWorkerApi>(worker);
  try {
    return await Promise.race([
      job(api),
      new Promise<never>((_, reject) => signal?.addEventListener("abort", () => reject(abortError(signal)), { once: true })),
    ]);
  } finally {
    worker.terminate();
  }
}
