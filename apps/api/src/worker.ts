// Worker process for scale-out: takes pool tasks (verified-run chunks, merges, nominal evaluations) from Redis
// through BullMQ and computes them with the optics package. Start any number, on any machine that reaches Redis:
//   REDIS_URL=redis://host:6379 node apps/api/dist/worker.js      (or: pnpm --filter @stackproof/api worker)
// A worker that dies mid-chunk stops renewing its lock; after WORKER_LOCK_MS another worker takes the chunk again
// (BullMQ's stalled-job check). Trial i's draws depend only on the seed and i, so a retried chunk is identical.
import { Worker } from "bullmq";
import { pino } from "pino";
import { runPoolTask, type PoolTask } from "@stackproof/optics/pool-worker";
import { loadEnv, logLevelOf } from "./env.ts";
import { QUEUE_NAME, redisClient, runTaskForQueue } from "./yield/redis.ts";

const env = loadEnv(process.env, { sendsMail: false });
const log = pino({ level: logLevelOf(env), base: { service: "stackproof-worker", pid: process.pid } });
if (!env.REDIS_URL) {
  log.fatal("REDIS_URL is not set: a worker process takes its work from Redis");
  process.exit(2);
}

// Each chunk is ~50 ms of computation on this thread; the lock is renewed between chunks.
const worker = new Worker(
  QUEUE_NAME,
  async (job) => runTaskForQueue(() => runPoolTask(job.data as PoolTask)),
  {
    connection: redisClient(env.REDIS_URL),
    concurrency: env.WORKER_CONCURRENCY,
    lockDuration: env.WORKER_LOCK_MS,
    stalledInterval: env.WORKER_LOCK_MS,
    maxStalledCount: 5,
  },
);
worker.on("ready", () => log.info({ queue: QUEUE_NAME }, "worker ready"));
worker.on("completed", (job) => log.debug({ job: job.id, kind: job.name }, "task done"));
worker.on("failed", (job, err) => log.warn({ job: job?.id, kind: job?.name, err }, "task failed"));
worker.on("error", (err) => log.error({ err }, "worker error"));

let closing = false;
async function shutdown(signal: string) {
  if (closing) return;
  closing = true;
  log.info({ signal }, "finishing the task in hand, then stopping");
  await worker.close();
  process.exit(0);
}
process.on("SIGINT", () => void shutdown("SIGINT"));
process.on("SIGTERM", () => void shutdown("SIGTERM"));
