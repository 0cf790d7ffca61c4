// BullMQ plumbing shared by the API (producer) and the worker processes (consumers).
import { Redis } from "ioredis";

/** Queue of pool tasks (chunks, merges, nominal evaluations). */
export const QUEUE_NAME = "stackproof-pool";

/**
 * A Redis client for one BullMQ queue, worker or event stream (BullMQ needs maxRetriesPerRequest: null). Under ESM,
 * BullMQ 6 takes a constructed client rather than connection options. Close it after the BullMQ object using it.
 */
export function redisClient(url: string): Redis {
  return new Redis(url, { maxRetriesPerRequest: null });
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
