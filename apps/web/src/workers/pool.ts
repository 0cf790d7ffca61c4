// The page's warm pool of Web Workers for Monte Carlo yield: up to navigator.hardwareConcurrency workers, created
// once per page and reused by every study (a fresh worker spends the first thousands of trials compiling the
// engine, which used to cancel out a second worker on small studies). warmYieldPool() starts them and runs a small
// study through each when the app loads. Each worker runs runYieldChunk on the chunks it pulls from a shared queue;
// the main thread merges with mergeYieldChunks. Trial i depends only on (seed, i), so the merged result does not
// depend on the chunking or worker count.
import * as Comlink from "comlink";
import { designFromQwots, mergeYieldChunks } from "@stackproof/optics";
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
  dead: boolean;
}

function spawnYieldWorker(): Handle {
  const worker = new Worker(new URL("./yield.worker.ts", import.meta.url), {
    type: "module",
    name: "stackproof-yield",
  });
  const handle: Handle = { worker, api: Comlink.wrap<YieldWorkerApi>(worker), dead: false };
  worker.addEventListener("error", () => {
    handle.dead = true; // replaced on the next study
  });
  return handle;
}

/** The page's workers, created on first use (or by warmYieldPool) and kept. */
const warm: Handle[] = [];
let warming: Promise<void> | null = null;
let nextKey = 1;

/** `n` live workers of the page's pool (started if missing; a worker that failed is replaced). */
function poolHandles(n: number): Handle[] {
  for (let i = 0; i < warm.length; i++) {
    if ((warm[i] as Handle).dead) {
      (warm[i] as Handle).worker.terminate();
      warm[i] = spawnYieldWorker();
    }
  }
  while (warm.length < n) warm.push(spawnYieldWorker());
  return warm.slice(0, n);
}

/** A small study that makes every worker compile the engine's hot paths before the first real study. */
function warmUpStudy(): YieldStudy {
  return {
    design: designFromQwots({
      name: "warm-up",
      referenceWavelength: 550,
      layers: Array.from({ length: 12 }, (_, i) => ({ material: i % 2 ? "MgF2" : "Al2O3", qwot: 1 })),
      substrate: { material: "boro-crown", thicknessMm: 1, backside: false },
    }),
    mask: {
      bands: [
        {
          id: "w",
          start: 450,
          stop: 650,
          step: 5,
          quantity: "R",
          polarization: "u",
          angleDeg: 20,
          requirement: "max",
          value: 5,
        },
      ],
    },
    errorModel: { thickness: { relativePct: 1, absoluteNm: 0.5, distribution: "normal" } },
    trials: 600,
    seed: "warm-up",
  };
}

/**
 * Start the page's workers and warm each one up (a 600-trial study per worker, about a second of background
 * work). Safe to call many times; studies started meanwhile simply run alongside.
 */
export function warmYieldPool(workers?: number): Promise<void> {
  if (typeof Worker === "undefined") return Promise.resolve();
  warming ??= (async () => {
    const study = warmUpStudy();
    await Promise.all(
      poolHandles(poolSize(workers)).map(async (h) => {
        const key = nextKey++;
        await h.api.init(key, study);
        for (let s = 0; s < study.trials; s += 150) await h.api.runChunk(key, s, 150);
        await h.api.release(key);
      }),
    ).catch(() => undefined); // a failed warm-up only costs speed; the study reports real errors
  })();
  return warming;
}

export function poolSize(requested?: number): number {
  const hw =
    typeof navigator !== "undefined" && navigator.hardwareConcurrency ? navigator.hardwareConcurrency : 2;
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
    // An aborted study stops handing out chunks (the shared workers only finish the chunk in hand).
    while (failed === null && !signal?.aborted && next < tasks.length) {
      const task = tasks[next++] as T;
      const r = await run(h, task);
      if (signal?.aborted) return;
      onResult(r, task);
    }
  });
  await Promise.race([
    Promise.all(loops).catch((e: unknown) => {
      failed = e;
      throw e;
    }),
    stop,
  ]);
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
  const handles = poolHandles(n);
  const key = nextKey++;
  const started = performance.now();
  const chunks: YieldChunk[] = [];
  let done = 0;
  const report = () => {
    const elapsedMs = performance.now() - started;
    options.onProgress?.({
      done,
      total: trials,
      elapsedMs,
      remainingMs: done > 0 ? (elapsedMs / done) * (trials - done) : null,
      workers: n,
    });
  };
  try {
    report();
    await Promise.race([
      Promise.all(handles.map((h) => h.api.init(key, study))),
      new Promise<never>((_, reject) =>
        signal?.addEventListener("abort", () => reject(abortError(signal)), { once: true }),
      ),
    ]);
    await drain(
      handles,
      tasks,
      (h, [s, c]) => h.api.runChunk(key, s, c),
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
    // The workers stay for the next study; only this study's compiled runner goes.
    for (const h of handles) void h.api.release(key).catch(() => undefined);
  }
}

/** Yield against scale factors on the error model, one scale per task, spread over the pool. */
export async function runSweepInPool(
  study: YieldStudy,
  scales: readonly number[],
  options: PoolOptions = {},
): Promise<SweepPoint[]> {
  const { signal } = options;
  signal?.throwIfAborted();
  const n = Math.min(poolSize(options.workers), scales.length);
  const handles = poolHandles(n);
  const out: SweepPoint[] = [];
  const started = performance.now();
  {
    await drain(
      handles,
      [...scales],
      (h, scale) => h.api.sweepPoint(study, scale),
      (p) => {
        out.push(p);
        const elapsedMs = performance.now() - started;
        options.onProgress?.({
          done: out.length,
          total: scales.length,
          elapsedMs,
          remainingMs: (elapsedMs / out.length) * (scales.length - out.length),
          workers: n,
        });
      },
      signal,
    );
    return out.sort((a, b) => a.scale - b.scale);
  }
}

/** Runs one engine job in a fresh worker; aborting terminates the worker at once. */
export async function runEngineJob<R>(
  job: (api: Comlink.Remote<EngineWorkerApi>) => Promise<R>,
  signal?: AbortSignal,
): Promise<R> {
  signal?.throwIfAborted();
  const worker = new Worker(new URL("./engine.worker.ts", import.meta.url), {
    type: "module",
    name: "stackproof-engine",
  });
  const api = Comlink.wrap<EngineWorkerApi>(worker);
  try {
    return await Promise.race([
      job(api),
      new Promise<never>((_, reject) =>
        signal?.addEventListener("abort", () => reject(abortError(signal)), { once: true }),
      ),
    ]);
  } finally {
    worker.terminate();
  }
}

// Warm the pool when the app loads (in idle time, so the first paint is not delayed).
if (typeof window !== "undefined" && typeof Worker !== "undefined") {
  const start = () => void warmYieldPool();
  if ("requestIdleCallback" in window) window.requestIdleCallback(start, { timeout: 3000 });
  else setTimeout(start, 500);
}
