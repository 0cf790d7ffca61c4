// BullMQ plumbing shared by the API (producer) and the worker processes (consumers).
import type { ConnectionOptions } from "bullmq";

/** Queue of pool tasks (chunks, merges, nominal evaluations). */
export const QUEUE_NAME = "stackproof-pool";

/** ioredis options from a redis:// URL (BullMQ workers need maxRetriesPerRequest: null). */
export function redisConnection(url: string): ConnectionOptions {
  const u = new URL(url);
  const db = u.pathname.length > 1 ? Number(u.pathname.slice(1)) : 0;
  return {
    host: u.hostname || "127.0.0.1",
    port: u.port ? Number(u.port) : 6379,
    username: u.username ? decodeURIComponent(u.username) : undefined,
    password: u.password ? decodeURIComponent(u.password) : undefined,
    db: Number.isInteger(db) ? db : 0,
    tls: u.protocol === "rediss:" ? {} : undefined,
    maxRetriesPerRequest: null,
  };
}

/** BullMQ keeps only an error's message: a RangeError (bad input, the caller's 400) is marked by this prefix. */
export const RANGE_PREFIX = "RangeError: ";

/** Runs a task for a BullMQ processor, marking RangeErrors so that the producer can tell them apart. */
export async function runTaskForQueue<T>(fn: () => Promise<T> | T): Promise<T> {
  try {
    return await fn();
  } catch (err) {
    if (err instanceof RangeError) throw new Error(RANGE_PREFIX + err.message);
    throw err;
  }
}
