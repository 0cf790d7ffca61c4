// Where pool tasks run: worker threads in this process (piscina), or worker processes through Redis (BullMQ).
import { fileURLToPath } from "node:url";
import { Queue, QueueEvents, Worker as BullWorker } from "bullmq";
import {
  createNodePool,
  defaultWorkerCount,
  type NodePool,
  type PoolResults,
  type PoolTask,
} from "@stackproof/optics/node-pool";
import type { Design, SpecMask, SpecResult } from "@stackproof/optics";
import type { Env } from "../env.ts";
import type { Redis } from "ioredis";
import { QUEUE_NAME, RANGE_PREFIX, redisClient, runTaskForQueue } from "./redis.ts";

/** Runs pool tasks; `slots` is how many chunks the fair scheduler keeps in flight. */
export interface Compute {
  readonly mode: "embedded" | "redis";
  /** Worker threads in this process (0 when only remote workers compute). */
  readonly threads: number;
  readonly slots: number;
  run<K extends PoolTask["kind"]>(task: Extract<PoolTask, { kind: K }>): Promise<PoolResults[K]>;
  /** Nominal spec evaluation off the request thread. */
  evaluateSpec(design: Design, mask: SpecMask): Promise<SpecResult>;
  /** Waits for the tasks running in this process, then stops threads and connections. */
  close(): Promise<void>;
}

/** The compiled task module next to dist/index.js, or the TypeScript one in development and tests. */
export function poolWorkerFile(): string {
  const here = import.meta.url;
  const url = here.endsWith(".ts") ? new URL("./pool-worker.ts", here) : new URL("./pool-worker.js", here);
  return fileURLToPath(url);
}

function threadsOf(env: Env): number {
  return env.EMBEDDED_WORKERS ?? env.YIELD_WORKERS ?? defaultWorkerCount();
}

/** Errors keep their kind across the thread or process boundary (a RangeError is the caller's 400). */
function reviveError(message: string, name: string | undefined): Error {
  return name === "RangeError" ? new RangeError(message) : new Error(message);
}

export function createCompute(env: Env): Compute {
  const threads = threadsOf(env);
  const pool: NodePool | null =
    threads > 0
      ? createNodePool({ threads, filename: poolWorkerFile(), warm: env.NODE_ENV !== "test" })
      : null;
  const runLocal = <K extends PoolTask["kind"]>(task: Extract<PoolTask, { kind: K }>) =>
    (pool as NodePool).run(task).catch((err: unknown) => {
      throw err instanceof Error ? reviveError(err.message, err.name) : err;
    });

  if (!env.REDIS_URL) {
    return {
      mode: "embedded",
      threads,
      slots: threads,
      run: runLocal,
      evaluateSpec: (design, mask) => runLocal({ kind: "spec", design, mask }),
      close: async () => pool?.close(),
    };
  }

  const clients = [redisClient(env.REDIS_URL), redisClient(env.REDIS_URL), redisClient(env.REDIS_URL)];
  const [queueClient, eventsClient, workerClient] = clients as [Redis, Redis, Redis];
  const queue = new Queue(QUEUE_NAME, { connection: queueClient });
  const events = new QueueEvents(QUEUE_NAME, { connection: eventsClient });
  // With local threads, this process is one of the Redis workers too (its threads take queued tasks).
  const local =
    pool && threads > 0
      ? new BullWorker(QUEUE_NAME, (job) => runTaskForQueue(() => runLocal(job.data as PoolTask)), {
          connection: workerClient,
          concurrency: threads,
          lockDuration: env.WORKER_LOCK_MS,
          stalledInterval: env.WORKER_LOCK_MS,
          maxStalledCount: 5,
        })
      : null;
  const ready = events.waitUntilReady();

  const remote = async <K extends PoolTask["kind"]>(
    task: Extract<PoolTask, { kind: K }>,
  ): Promise<PoolResults[K]> => {
    await ready;
    const job = await queue.add(task.kind, task, {
      // nominal evaluations are someone waiting on a page: ahead of chunks (lower number = sooner)
      priority: task.kind === "spec" ? 1 : 10,
      attempts: 1,
      removeOnComplete: { age: 300 },
      removeOnFail: { age: 3600 },
    });
    try {
      return (await job.waitUntilFinished(events)) as PoolResults[K];
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err);
      throw message.startsWith(RANGE_PREFIX)
        ? new RangeError(message.slice(RANGE_PREFIX.length))
        : new Error(message);
    }
  };

  return {
    mode: "redis",
    threads,
    slots: env.REDIS_CHUNKS_IN_FLIGHT,
    run: remote,
    evaluateSpec: (design, mask) => remote({ kind: "spec", design, mask }),
    async close() {
      await local?.close();
      await pool?.close();
      await events.close();
      await queue.close();
      await Promise.all(clients.map((c) => c.quit().catch(() => c.disconnect())));
    },
  };
}
