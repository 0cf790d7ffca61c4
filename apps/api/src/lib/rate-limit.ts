// Sliding-window failure counter, in memory (one process). Used for sign-in attempts.

export interface FailureLimiter {
  /** Seconds until another attempt is allowed for `key`, or 0 when allowed now. */
  retryAfter(key: string, now?: number): number;
  /** Records a failed attempt. */
  fail(key: string, now?: number): void;
  /** Forgets the failures of `key` (after a success). */
  reset(key: string): void;
}

export function createFailureLimiter(opts: { max: number; windowMs: number }): FailureLimiter {
  const failures = new Map<string, number[]>();

  function recent(key: string, now: number): number[] {
    const list = (failures.get(key) ?? []).filter((t) => t > now - opts.windowMs);
    if (list.length === 0) failures.delete(key);
    else failures.set(key, list);
    return list;
  }

  function sweep(now: number) {
    if (failures.size < 10_000) return;
    for (const key of failures.keys()) recent(key, now);
  }

  return {
    retryAfter(key, now = Date.now()) {
      const list = recent(key, now);
      if (list.length < opts.max) return 0;
      const oldestThatCounts = list[list.length - opts.max] ?? now;
      return Math.max(1, Math.ceil((oldestThatCounts + opts.windowMs - now) / 1000));
    },
    fail(key, now = Date.now()) {
      sweep(now);
      const list = recent(key, now);
      list.push(now);
      failures.set(key, list);
    },
    reset(key) {
      failures.delete(key);
    },
  };
}
