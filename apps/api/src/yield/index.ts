// Verified yield runs: persisted jobs whose chunks run on the pool (worker threads here, or worker processes
// through Redis; see compute.ts).
//
// A run is split into small chunks of trials; each finished chunk is stored (yield_chunks) with the progress, so a
// process that stops mid-run resumes where it was. The optics package's chunking-independent merge makes the
// result identical for any chunk size, worker count or machine. Runs share the pool round-robin, a chunk at a
// time (the fair scheduler), so a large run holds a small one back by at most one chunk per slot; cancellation
// takes effect when the chunks in flight (about 50 ms of work each) are back.
import { and, asc, count, eq, inArray } from "drizzle-orm";
import { ENGINE_VERSION, type YieldChunk, type YieldResult, type YieldStudy } from "@stackproof/optics";
import type { Env } from "../env.ts";
import type { Db } from "../db/client.ts";
import type { MailService } from "../mail/index.ts";
import { designs, programs, revisions, yieldChunks, yieldRuns } from "../db/schema.ts";
import { maskOf, stackOf, type YieldRunRow } from "../domain/load.ts";
import {
  dropRunChunks,
  failRun,
  markRunRunning,
  requeueRun,
  storeFinishedRun,
  storeRunChunk,
} from "../domain/yield-runs.ts";
import { createFairScheduler, FAIR_CHUNK_TRIALS } from "@stackproof/optics/node-pool";
import { HttpError } from "../lib/errors.ts";
import type { Compute } from "./compute.ts";

export interface JobService {
  /** Number of worker threads in this process (0 when only Redis workers compute). */
  readonly size: number;
  /** Refuses a new run that would exceed a cap on runs queued or running (429 naming the cap). */
  admit(requester: { userId: string; workspaceId: string }): void;
  /** Schedule a run stored with status "queued". */
  enqueue(runId: string): void;
  /** Stop a run: no more of its chunks start (its row is already marked cancelled by the caller). */
  cancel(runId: string): void;
  /** Resolves when the run reaches done, failed or cancelled (or when the service closes). */
  settled(runId: string): Promise<void>;
  /** What start-up did with runs left queued or running by a previous process. */
  readonly recovered: { resumed: string[]; failed: string[] };
  /** Stops scheduling, waits for chunks in flight; runs in progress stay stored and are resumed by the next process. */
  close(): Promise<void>;
}

/** Trials per chunk: small and fixed (about 50 ms of one thread) so that runs interleave and stop quickly. */
export function chunkSizeFor(trials: number): number {
  return Math.max(1, Math.min(FAIR_CHUNK_TRIALS, trials));
}

/** Study of a stored run: the revision's stack and mask, the run's error model, trials and seed. */
export function studyForRun(db: Db, run: YieldRunRow): YieldStudy | null {
  const row = db
    .select({ revision: revisions, program: programs })
    .from(revisions)
    .innerJoin(designs, eq(revisions.designId, designs.id))
    .innerJoin(programs, eq(designs.programId, programs.id))
    .where(eq(revisions.id, run.revisionId))
    .get();
  if (!row) return null;
  return {
    design: stackOf(row.revision),
    mask: maskOf(row.revision, row.program),
    errorModel: run.errorModel,
    trials: run.trials,
    seed: run.seed,
  };
}

// finishedRunValues (the finished run's columns) lives with the domain: the demo seeder stores finished runs too.
export { finishedRunValues } from "../domain/yield-runs.ts";

/** Runs scheduled at once; further runs wait queued (each still gets its turn within the caps). */
const MAX_SCHEDULED_RUNS = 64;

export function createJobService(deps: {
  env: Env;
  db: Db;
  mail: MailService;
  compute: Compute;
}): JobService {
  const { db, compute, env } = deps;
  const scheduler = createFairScheduler(compute.slots);
  const queue: string[] = [];
  const scheduled = new Set<string>();
  const merging = new Set<Promise<void>>();
  const waiters = new Map<string, (() => void)[]>();
  let closed = false;

  const release = (runId: string) => {
    for (const w of waiters.get(runId) ?? []) w();
    waiters.delete(runId);
  };

  function loadRun(runId: string): YieldRunRow | undefined {
    return db.select().from(yieldRuns).where(eq(yieldRuns.id, runId)).get();
  }

  function fail(runId: string, error: string) {
    failRun(db, runId, error);
  }

  /** Fails a run without throwing (a run must never be left running because storing its outcome threw). */
  function failSafely(runId: string, error: string) {
    try {
      fail(runId, error);
    } catch (err) {
      console.error(`yield run ${runId}: could not be marked failed (${error}):`, err);
    }
  }

  const messageOf = (err: unknown) => (err instanceof Error ? err.message : String(err));

  /** A run left the scheduler: drop its chunks unless it is still to be resumed, wake its waiters, take the next. */
  function finish(runId: string) {
    scheduled.delete(runId);
    if (!closed) {
      const status = loadRun(runId)?.status;
      if (status !== "queued" && status !== "running") dropRunChunks(db, runId);
      release(runId);
      setImmediate(pump);
    }
  }

  /** Ranges of a run not yet covered by stored chunks (a resumed run keeps what it has). */
  function pendingRanges(run: YieldRunRow): { pending: [number, number][]; covered: number } {
    const stored = db
      .select({ startTrial: yieldChunks.startTrial, count: yieldChunks.count })
      .from(yieldChunks)
      .where(eq(yieldChunks.runId, run.id))
      .all();
    const covered = stored.reduce((s, c) => s + c.count, 0);
    const ranges = stored
      .map((c) => [c.startTrial, c.startTrial + c.count] as const)
      .sort((a, b) => a[0] - b[0]);
    const size = chunkSizeFor(run.trials);
    let cursor = 0;
    const gaps: [number, number][] = [];
    for (const [s, e] of ranges) {
      if (s > cursor) gaps.push([cursor, s]);
      cursor = Math.max(cursor, e);
    }
    if (cursor < run.trials) gaps.push([cursor, run.trials]);
    const pending: [number, number][] = [];
    for (const [s, e] of gaps) for (let t = s; t < e; t += size) pending.push([t, Math.min(size, e - t)]);
    return { pending, covered };
  }

  function pump() {
    while (!closed && scheduled.size < MAX_SCHEDULED_RUNS && queue.length > 0) {
      const runId = queue.shift() as string;
      if (scheduled.has(runId)) continue;
      const run = loadRun(runId);
      if (!run || (run.status !== "queued" && run.status !== "running")) {
        release(runId);
        continue;
      }
      const study = studyForRun(db, run);
      if (!study) {
        failSafely(runId, "the revision of this run no longer exists");
        release(runId);
        continue;
      }
      const { pending, covered } = pendingRanges(run);
      markRunRunning(db, run, covered);
      scheduled.add(runId);
      scheduler.add<YieldChunk>({
        id: runId,
        pending,
        exec: (start, count) => compute.run({ kind: "chunk", key: runId, study, start, count }),
        onChunk: (chunk) => {
          if (closed) return;
          let stored: boolean;
          try {
            stored = storeChunk(runId, chunk);
          } catch (err) {
            failSafely(runId, `trials could not be stored: ${messageOf(err)}`);
            stored = false;
          }
          if (!stored) void scheduler.stop(runId); // cancelled, failed or not storable
        },
        onError: (err) => {
          if (!closed) failSafely(runId, `trials could not be computed: ${messageOf(err)}`);
        },
        onSettled: (complete) => {
          if (complete && !closed) {
            const merge = mergeAndStore(run, study)
              .catch((err: unknown) => {
                if (!closed) failSafely(runId, `the result could not be stored: ${messageOf(err)}`);
              })
              .finally(() => {
                merging.delete(merge);
                finish(runId);
              });
            merging.add(merge);
          } else finish(runId);
        },
      });
    }
  }

  /** Stores a chunk and the progress; false when the run is no longer running. */
  function storeChunk(runId: string, chunk: YieldChunk): boolean {
    return storeRunChunk(db, runId, chunk);
  }

  async function mergeAndStore(run: YieldRunRow, study: YieldStudy) {
    const chunks = db
      .select({ data: yieldChunks.data })
      .from(yieldChunks)
      .where(eq(yieldChunks.runId, run.id))
      .orderBy(asc(yieldChunks.startTrial))
      .all()
      .map((c) => c.data as YieldChunk);
    let result: YieldResult;
    try {
      result = await compute.run({ kind: "merge", study, chunks });
    } catch (err) {
      if (!closed) fail(run.id, `trials could not be merged: ${messageOf(err)}`);
      return;
    }
    if (closed) return;
    const current = loadRun(run.id);
    if (!current || current.status !== "running") return;
    storeFinishedRun(db, current, result);
  }

  function activeCount(where: ReturnType<typeof eq>): number {
    const row = db
      .select({ n: count() })
      .from(yieldRuns)
      .innerJoin(revisions, eq(yieldRuns.revisionId, revisions.id))
      .innerJoin(designs, eq(revisions.designId, designs.id))
      .innerJoin(programs, eq(designs.programId, programs.id))
      .where(and(where, inArray(yieldRuns.status, ["queued", "running"])))
      .get();
    return row?.n ?? 0;
  }

  // Start-up: runs a previous process left queued or running are resumed, or failed with the reason.
  const recovered = { resumed: [] as string[], failed: [] as string[] };
  const leftOver = db
    .select()
    .from(yieldRuns)
    .where(inArray(yieldRuns.status, ["queued", "running"]))
    .orderBy(asc(yieldRuns.createdAt), asc(yieldRuns.id))
    .all();
  for (const run of leftOver) {
    if (run.engineVersion !== ENGINE_VERSION) {
      fail(
        run.id,
        `the server restarted with engine ${ENGINE_VERSION} while this run used ${run.engineVersion}; start a new run`,
      );
      dropRunChunks(db, run.id);
      recovered.failed.push(run.id);
    } else {
      requeueRun(db, run.id);
      queue.push(run.id);
      recovered.resumed.push(run.id);
    }
  }
  if (queue.length > 0) setImmediate(pump);

  return {
    size: compute.threads,
    recovered,
    admit({ userId, workspaceId }) {
      const mine = activeCount(eq(yieldRuns.requestedBy, userId));
      if (mine >= env.MAX_ACTIVE_RUNS_PER_USER)
        throw new HttpError(
          429,
          "run_cap",
          `You already have ${mine} yield runs queued or running; the cap is ${env.MAX_ACTIVE_RUNS_PER_USER} per member (MAX_ACTIVE_RUNS_PER_USER). Wait for one to finish or cancel one.`,
          { cap: "MAX_ACTIVE_RUNS_PER_USER", limit: env.MAX_ACTIVE_RUNS_PER_USER, active: mine },
        );
      const theirs = activeCount(eq(programs.workspaceId, workspaceId));
      if (theirs >= env.MAX_ACTIVE_RUNS_PER_WORKSPACE)
        throw new HttpError(
          429,
          "run_cap",
          `The workspace already has ${theirs} yield runs queued or running; the cap is ${env.MAX_ACTIVE_RUNS_PER_WORKSPACE} (MAX_ACTIVE_RUNS_PER_WORKSPACE).`,
          { cap: "MAX_ACTIVE_RUNS_PER_WORKSPACE", limit: env.MAX_ACTIVE_RUNS_PER_WORKSPACE, active: theirs },
        );
    },
    enqueue(runId) {
      if (closed) return;
      queue.push(runId);
      setImmediate(pump);
    },
    cancel(runId) {
      const i = queue.indexOf(runId);
      if (i >= 0) {
        queue.splice(i, 1);
        release(runId);
      }
      if (scheduler.has(runId)) void scheduler.stop(runId);
    },
    settled(runId) {
      const run = loadRun(runId);
      if (closed || !run || (run.status !== "queued" && run.status !== "running")) return Promise.resolve();
      return new Promise((resolve) => {
        const list = waiters.get(runId) ?? [];
        list.push(resolve);
        waiters.set(runId, list);
      });
    },
    async close() {
      if (closed) return;
      closed = true;
      for (const id of [...waiters.keys()]) release(id);
      await Promise.all([...scheduled].map((id) => scheduler.stop(id)));
      await scheduler.drained();
      await Promise.all([...merging]);
    },
  };
}
