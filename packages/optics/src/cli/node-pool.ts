// Node-only: a worker_threads pool for yield studies. Kept out of src/studies so the browser bundle never sees node: modules.
import { Worker } from "node:worker_threads";
import { availableParallelism } from "node:os";
import { mergeYieldChunks, parseYieldStudy, planChunks } from "../studies/index.ts";
import type { YieldChunk, YieldResult, YieldStudy } from "../studies/index.ts";

/** Messages from a yield worker. */
export type WorkerReply = { type: "ready" } | { type: "chunk"; chunk: YieldChunk } | { type: "error"; message: string };

/** Options of {@link runYieldWithWorkers}. */
export interface PoolOptions {
  workers: number;
  /** Trials per chunk; default spreads the study over about 8 chunks per worker, 25..1000 trials each. */
  chunkSize?: number;
  onProgress?: (done: number, total: number) => void;
}

/** Number of worker threads worth starting on this machine. */
export function defaultWorkerCount(): number {
  return Math.max(1, availableParallelism());
}

const workerUrl = new URL("./yield-worker.ts", import.meta.url);

/**
 * Run a yield study on a pool of Node worker threads. Chunks are handed out on demand; the merge does not
 * depend on which worker ran which chunk, so the result is identical to a single-threaded run.
 */
export async function runYieldWithWorkers(studyInput: YieldStudy, options: PoolOptions): Promise<YieldResult> {
  const study = parseYieldStudy(studyInput);
  const count = options.workers;
  if (!Number.isInteger(count) || count < 1 || count > 64) throw new RangeError(`workers must be an integer in 1..64, got ${count}`);
  const chunkSize = options.chunkSize ?? Math.min(1000, Math.max(25, Math.ceil(study.trials / (count * 8))));
  const queue = planChunks(study.trials, chunkSize);
  const total = study.trials;
  const chunks: YieldChunk[] = [];
  let done = 0;
  const workers: Worker[] = [];
  try {
    await new Promise<void>((resolve, reject) => {
      let active = 0;
      let failed = false;
      const fail = (error: Error): void => {
        if (failed) return;
        failed = true;
        reject(error);
      };
      const feed = (worker: Worker): void => {
        const next = queue.shift();
        if (!next) {
          active--;
          if (active === 0 && !failed) resolve();
          return;
        }
        worker.postMessage({ type: "run", start: next[0], count: next[1] });
      };
      for (let w = 0; w < Math.min(count, queue.length); w++) {
        const worker = new Worker(workerUrl, { workerData: { study } });
        workers.push(worker);
        active++;
        worker.on("message", (reply: WorkerReply) => {
          if (reply.type === "error") return fail(new RangeError(reply.message));
          if (reply.type === "chunk") {
            chunks.push(reply.chunk);
            done += reply.chunk.count;
            options.onProgress?.(done, total);
          }
          feed(worker);
        });
        worker.on("error", fail);
        worker.on("exit", (code) => {
          if (code !== 0) fail(new Error(`yield worker exited with code ${code}`));
        });
      }
    });
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
  return mergeYieldChunks(study, chunks);
}
