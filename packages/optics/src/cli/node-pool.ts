// Node-only: a worker_threads pool for yield studies. Kept out of src/studies so the browser bundle never sees node: modules.
import { Worker } from "node:worker_threads";
import { availableParallelism } from "node:os";
import { mergeYieldChunks, parseYieldStudy, planChunks } from "../studies/index.ts";
import type { YieldChunk, YieldResult, YieldStudy } from "../studies/index.ts";

/** Messages to a yield worker. */
export type WorkerRequest =
  | { type: "study"; id: number; study: YieldStudy }
  | { type: "run"; id: number; start: number; count: number }
  | { type: "release"; id: number };
/** Messages from a yield worker. */
export type WorkerReply =
  { type: "chunk"; id: number; chunk: YieldChunk } | { type: "error"; id: number; message: string };

/** Options of one pooled run. */
export interface PoolRunOptions {
  /** Trials per chunk; default spreads the study over about 8 chunks per worker, 25..1000 trials each. */
  chunkSize?: number;
  onProgress?: (done: number, total: number) => void;
  /** Checked between chunks; the run rejects with the signal's reason. */
  signal?: AbortSignal;
}

/** A persistent pool of worker threads running yield chunks. */
export interface YieldPool {
  readonly size: number;
  /** Run a whole study; runs are queued one after another. Same result as a single-threaded run. */
  run(study: YieldStudy, options?: PoolRunOptions): Promise<YieldResult>;
  close(): Promise<void>;
}

/** Number of worker threads worth starting on this machine. */
export function defaultWorkerCount(): number {
  return Math.max(1, availableParallelism());
}

const workerUrl = new URL("./yield-worker.ts", import.meta.url);
const bootstrapUrl = new URL("./worker-bootstrap.mjs", import.meta.url);

/** Start a yield worker; a TypeScript worker file goes through a bootstrap that registers the tsx loader. */
function startWorker(): Worker {
  if (!workerUrl.pathname.endsWith(".ts")) return new Worker(workerUrl);
  return new Worker(bootstrapUrl, { workerData: { entry: workerUrl.href } });
}

interface Slot {
  worker: Worker;
  studies: Set<number>;
  onReply: ((reply: WorkerReply) => void) | null;
  onFailure: ((error: Error) => void) | null;
  /** The thread has exited or failed; it is replaced before the next run. */
  dead: boolean;
}

/** Start `size` worker threads. Close the pool when done (the threads keep the process alive). */
export function createYieldPool(size: number): YieldPool {
  if (!Number.isInteger(size) || size < 1 || size > 64)
    throw new RangeError(`workers must be an integer in 1..64, got ${size}`);
  let closing = false;
  const attach = (slot: Slot): void => {
    const worker = startWorker();
    slot.worker = worker;
    slot.studies = new Set();
    slot.dead = false;
    worker.on("message", (reply: WorkerReply) => slot.onReply?.(reply));
    worker.on("error", (error) => {
      slot.dead = true;
      slot.onFailure?.(error);
    });
    worker.on("exit", (code) => {
      slot.dead = true;
      if (!closing) slot.onFailure?.(new Error(`yield worker exited with code ${code}`));
    });
  };
  const slots: Slot[] = Array.from({ length: size }, () => {
    const slot = { studies: new Set(), onReply: null, onFailure: null, dead: false } as unknown as Slot;
    attach(slot);
    return slot;
  });
  let nextId = 1;
  let queue: Promise<unknown> = Promise.resolve();

  const runOnce = async (studyInput: YieldStudy, options: PoolRunOptions): Promise<YieldResult> => {
    const study = parseYieldStudy(studyInput);
    for (const slot of slots) if (slot.dead) attach(slot);
    const id = nextId++;
    const chunkSize = options.chunkSize ?? Math.min(1000, Math.max(25, Math.ceil(study.trials / (size * 8))));
    const pending = planChunks(study.trials, chunkSize);
    const chunks: YieldChunk[] = [];
    let done = 0;
    try {
      await new Promise<void>((resolve, reject) => {
        let active = 0;
        let failed = false;
        const fail = (error: Error): void => {
          if (failed) return;
          failed = true;
          reject(error);
        };
        const feed = (slot: Slot): void => {
          if (failed) return;
          if (options.signal?.aborted)
            return fail(
              options.signal.reason instanceof Error ? options.signal.reason : new Error("aborted"),
            );
          const next = pending.shift();
          if (!next) {
            slot.onReply = null;
            slot.onFailure = null;
            active--;
            if (active === 0) resolve();
            return;
          }
          if (!slot.studies.has(id)) {
            slot.worker.postMessage({ type: "study", id, study } satisfies WorkerRequest);
            slot.studies.add(id);
          }
          slot.worker.postMessage({
            type: "run",
            id,
            start: next[0],
            count: next[1],
          } satisfies WorkerRequest);
        };
        for (const slot of slots.slice(0, Math.min(size, pending.length))) {
          active++;
          slot.onFailure = fail;
          slot.onReply = (reply) => {
            if (reply.id !== id) return;
            if (reply.type === "error") return fail(new RangeError(reply.message));
            chunks.push(reply.chunk);
            done += reply.chunk.count;
            options.onProgress?.(done, study.trials);
            feed(slot);
          };
          feed(slot);
        }
      });
    } finally {
      for (const slot of slots) {
        slot.onReply = null;
        slot.onFailure = null;
        if (slot.studies.delete(id) && !slot.dead)
          slot.worker.postMessage({ type: "release", id } satisfies WorkerRequest);
      }
    }
    return mergeYieldChunks(study, chunks);
  };

  return {
    size,
    run(study, options = {}) {
      const result = queue.then(() => runOnce(study, options));
      queue = result.catch(() => undefined);
      return result;
    },
    async close() {
      closing = true;
      for (const slot of slots) slot.onFailure = null;
      await Promise.all(slots.map((s) => s.worker.terminate()));
    },
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
