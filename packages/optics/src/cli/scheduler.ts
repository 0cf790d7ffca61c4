// Fair scheduling of chunked runs over a fixed number of execution slots (threads or remote workers).
// Hand-written because it is a few dozen lines of policy, not machinery: piscina and BullMQ queue FIFO, so a
// 200,000-trial run queued whole would hold every later run until it ends. Here every run is split into small
// chunks and the slots are handed to runs in turn (round-robin), so a run waits at most one chunk per slot.

/** One run: ranges of trials still to compute and what to do with each. */
export interface FairRun<T> {
  /** Unique among the runs in the scheduler. */
  readonly id: string;
  /** [start, count] ranges still to compute, in order; the scheduler takes them from the front. */
  readonly pending: [number, number][];
  /** Computes one range (on a thread, a remote worker, ...). */
  exec(start: number, count: number): Promise<T>;
  /** A range finished; throwing stops the run (reported through onError). */
  onChunk(value: T, start: number, count: number): void;
  /** A range or onChunk failed; the run is stopped, chunks in flight are awaited, then onSettled runs. */
  onError(error: unknown): void;
  /** Every range is computed (`complete`), or the run was stopped or failed and nothing is in flight any more. */
  onSettled(complete: boolean): void;
}

export interface FairScheduler {
  /** Slots in use right now. */
  readonly busy: number;
  /** Adds a run; its chunks interleave with the chunks of the runs already there. */
  add<T>(run: FairRun<T>): void;
  /** Stops a run: no more of its chunks start; resolves when its chunks in flight are back. */
  stop(id: string): Promise<void>;
  has(id: string): boolean;
  /** Resolves when no chunk of any run is in flight (used when shutting down after stopping every run). */
  drained(): Promise<void>;
}

interface Entry {
  run: FairRun<unknown>;
  inFlight: number;
  stopped: boolean;
  failed: boolean;
  waiters: (() => void)[];
}

/** A round-robin scheduler over `slots` concurrent executions (≥ 1). */
export function createFairScheduler(slots: number): FairScheduler {
  if (!Number.isInteger(slots) || slots < 1)
    throw new RangeError(`slots must be a positive integer, got ${slots}`);
  const entries: Entry[] = [];
  let cursor = 0;
  let busy = 0;
  let drainWaiters: (() => void)[] = [];

  const settle = (e: Entry) => {
    const i = entries.indexOf(e);
    if (i < 0) return;
    entries.splice(i, 1);
    if (cursor > i) cursor--;
    const complete = !e.stopped && !e.failed && e.run.pending.length === 0;
    try {
      e.run.onSettled(complete);
    } finally {
      for (const w of e.waiters) w();
    }
  };

  const maybeSettle = (e: Entry) => {
    if (e.inFlight > 0) return;
    if (e.stopped || e.failed || e.run.pending.length === 0) settle(e);
  };

  const fill = () => {
    while (busy < slots) {
      let picked: Entry | null = null;
      for (let k = 0; k < entries.length; k++) {
        const index = (cursor + k) % entries.length;
        const e = entries[index] as Entry;
        if (!e.stopped && !e.failed && e.run.pending.length > 0) {
          picked = e;
          cursor = index + 1; // a run added at the end is next in turn
          break;
        }
      }
      if (!picked) break;
      const e = picked;
      const [start, count] = e.run.pending.shift() as [number, number];
      busy++;
      e.inFlight++;
      let promise: Promise<unknown>;
      try {
        promise = e.run.exec(start, count);
      } catch (err) {
        promise = Promise.reject(err);
      }
      promise
        .then(
          (value) => {
            if (e.stopped || e.failed) return;
            e.run.onChunk(value, start, count);
          },
          (err: unknown) => {
            throw err;
          },
        )
        .catch((err: unknown) => {
          if (e.stopped || e.failed) return;
          e.failed = true;
          e.run.onError(err);
        })
        .finally(() => {
          busy--;
          e.inFlight--;
          maybeSettle(e);
          fill();
          if (busy === 0) {
            const ws = drainWaiters;
            drainWaiters = [];
            for (const w of ws) w();
          }
        });
    }
  };

  return {
    get busy() {
      return busy;
    },
    add(run) {
      if (entries.some((e) => e.run.id === run.id))
        throw new RangeError(`run ${run.id} is already scheduled`);
      const e: Entry = {
        run: run as FairRun<unknown>,
        inFlight: 0,
        stopped: false,
        failed: false,
        waiters: [],
      };
      entries.push(e);
      if (run.pending.length === 0) maybeSettle(e);
      else fill();
    },
    stop(id) {
      const e = entries.find((x) => x.run.id === id);
      if (!e) return Promise.resolve();
      e.stopped = true;
      const done = new Promise<void>((resolve) => e.waiters.push(resolve));
      maybeSettle(e);
      return done;
    },
    has(id) {
      return entries.some((e) => e.run.id === id);
    },
    drained() {
      if (busy === 0) return Promise.resolve();
      return new Promise((resolve) => drainWaiters.push(resolve));
    },
  };
}
