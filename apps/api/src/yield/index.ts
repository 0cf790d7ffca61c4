// Verified yield runs: persisted jobs executed in a pool of worker threads.
//
// A run is split into chunks of trials; each finished chunk is stored (yield_chunks) with the progress, so a
// process that stops mid-run resumes where it was. The optics package's chunking-independent merge makes the
// result identical for any chunk size or worker count. Runs are processed one at a time, FIFO, with all
// workers on the run's chunks. Cancellation takes effect between chunks.
import os from "node:os";
import { Worker } from "node:worker_threads";
import { and, asc, eq, inArray } from "drizzle-orm";
import {
  ENGINE_VERSION,
  type YieldChunk,
  type YieldResult,
  type YieldStudy,
} from "@stackproof/optics";
import type { Env } from "../env.ts";
import type { Db } from "../db/client.ts";
import type { MailService } from "../mail/index.ts";
import { designs, programs, revisions, yieldChunks, yieldRuns } from "../db/schema.ts";
import { maskOf, stackOf, type YieldRunRow } from "../domain/load.ts";
import { recordAudit, type DbOrTx } from "../lib/audit.ts";
import type { WorkerReply, WorkerRequest } from "./protocol.ts";
import { ClientResultSchema, verifyClientResult } from "./verify.ts";

export interface JobService {
  /** Number of worker threads the pool uses. */
  readonly size: number;
  /** Schedule a run stored with status "queued". */
  enqueue(runId: string): void;
  /** Stop a run between chunks (its row is already marked cancelled by the caller). */
  cancel(runId: string): void;
  /** Resolves when the run reaches done, failed or cancelled (or when the service closes). */
  settled(runId: string): Promise<void>;
  /** What start-up did with runs left queued or running by a previous process. */
  readonly recovered: { resumed: string[]; failed: string[] };
  /** Stops the workers; runs in progress stay stored and are resumed by the next process. */
  close(): Promise<void>;
}

/** Trials per chunk: about eight chunks per worker for progress and cancellation, within 25..2000. */
export function chunkSizeFor(trials: number, workers: number): number {
  return Math.max(25, Math.min(2000, Math.ceil(trials / (workers * 8))));
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

/** The finished run's columns: result, verification against a submitted client result, timestamps. */
export function finishedRunValues(run: YieldRunRow, result: YieldResult) {
  let verified = true;
  let mismatch: string | null = null;
  if (run.clientResult !== null && run.clientResult !== undefined) {
    const parsed = ClientResultSchema.safeParse(run.clientResult);
    if (!parsed.success) {
      verified = false;
      mismatch = "the submitted client result is not a yield result";
    } else {
      ({ verified, mismatch } = verifyClientResult(result, parsed.data, {
        trials: run.trials,
        seed: run.seed,
        errorModel: run.errorModel,
      }));
    }
  }
  return {
    status: "done" as const,
    progressDone: run.trials,
    result,
    verified,
    mismatch,
    engineVersion: result.engineVersion,
    finishedAt: new Date(),
  };
}

type WorkerRequestBody = WorkerRequest extends infer R
  ? R extends WorkerRequest
    ? Omit<R, "taskId">
    : never
  : never;

/** Audit entry for a state the job service gave a run (the system is the actor). */
function auditRun(db: DbOrTx, runId: string, action: string, summary: (label: string) => string) {
  const row = db
    .select({ workspaceId: programs.workspaceId, designName: designs.name, number: revisions.number })
    .from(yieldRuns)
    .innerJoin(revisions, eq(yieldRuns.revisionId, revisions.id))
    .innerJoin(designs, eq(revisions.designId, designs.id))
    .innerJoin(programs, eq(designs.programId, programs.id))
    .where(eq(yieldRuns.id, runId))
    .get();
  if (!row) return;
  recordAudit(db, {
    workspaceId: row.workspaceId,
    actorId: null,
    action,
    subjectType: "yield_run",
    subjectId: runId,
    summary: summary(`${row.designName} rev ${row.number}`),
  });
}

interface PoolWorker {
  worker: Worker;
  busy: boolean;
}

interface ActiveRun {
  run: YieldRunRow;
  study: YieldStudy;
  pending: [number, number][];
  inFlight: number;
  stopped: boolean;
}

export function createJobService(deps: { env: Env; db: Db; mail: MailService }): JobService {
  const { db } = deps;
  const size = deps.env.YIELD_WORKERS ?? Math.max(1, os.availableParallelism());
  const workers: PoolWorker[] = [];
  const tasks = new Map<number, { worker: PoolWorker; resolve: (r: WorkerReply) => void }>();
  const queue: string[] = [];
  const waiters = new Map<string, (() => void)[]>();
  let nextTask = 1;
  let active: ActiveRun | null = null;
  let closed = false;

  const release = (runId: string) => {
    for (const w of waiters.get(runId) ?? []) w();
    waiters.delete(runId);
  };

  function spawn(): PoolWorker {
    // worker-boot.mjs registers tsx in the worker and imports worker.ts (works under tsx and under vitest).
    const worker = new Worker(new URL("./worker-boot.mjs", import.meta.url));
    const pw: PoolWorker = { worker, busy: false };
    worker.on("message", (reply: WorkerReply) => {
      const task = tasks.get(reply.taskId);
      if (!task) return;
      tasks.delete(reply.taskId);
      pw.busy = false;
      task.resolve(reply);
    });
    const lost = (why: string) => {
      const i = workers.indexOf(pw);
      if (i >= 0) workers.splice(i, 1);
      for (const [id, t] of tasks) {
        if (t.worker === pw) {
          tasks.delete(id);
          t.resolve({ taskId: id, ok: false, error: why });
        }
      }
    };
    worker.on("error", (err) => lost(`worker failed: ${err.message}`));
    worker.on("exit", (code) => {
      if (!closed) lost(`worker stopped (exit code ${code})`);
    });
    workers.push(pw);
    return pw;
  }

  function idleWorker(): PoolWorker | null {
    const free = workers.find((w) => !w.busy);
    if (free) return free;
    return workers.length < size ? spawn() : null;
  }

  function send(pw: PoolWorker, request: WorkerRequestBody): Promise<WorkerReply> {
    const taskId = nextTask++;
    pw.busy = true;
    return new Promise((resolve) => {
      tasks.set(taskId, { worker: pw, resolve });
      pw.worker.postMessage({ ...request, taskId } as WorkerRequest);
    });
  }

  function loadRun(runId: string): YieldRunRow | undefined {
    return db.select().from(yieldRuns).where(eq(yieldRuns.id, runId)).get();
  }

  function fail(runId: string, error: string) {
    db.transaction((tx) => {
      const res = tx
        .update(yieldRuns)
        .set({ status: "failed", error, finishedAt: new Date() })
        .where(and(eq(yieldRuns.id, runId), inArray(yieldRuns.status, ["queued", "running"])))
        .run();
      if (res.changes === 1)
        auditRun(tx, runId, "yield_run.failed", (label) => `A yield run on ${label} failed: ${error}`);
    });
  }

  function finishActive() {
    const runId = active?.run.id;
    active = null;
    if (runId) {
      const status = loadRun(runId)?.status;
      if (status !== "queued" && status !== "running")
        db.delete(yieldChunks).where(eq(yieldChunks.runId, runId)).run();
      release(runId);
    }
    setImmediate(pump);
  }

  function pump() {
    if (closed || active) return;
    const runId = queue.shift();
    if (!runId) return;
    const run = loadRun(runId);
    if (!run || (run.status !== "queued" && run.status !== "running")) {
      release(runId);
      setImmediate(pump);
      return;
    }
    const study = studyForRun(db, run);
    if (!study) {
      fail(runId, "the revision of this run no longer exists");
      release(runId);
      setImmediate(pump);
      return;
    }
    const chunkSize = chunkSizeFor(run.trials, size);
    const stored = db
      .select({ startTrial: yieldChunks.startTrial, count: yieldChunks.count })
      .from(yieldChunks)
      .where(eq(yieldChunks.runId, runId))
      .all();
    // Chunks stored by a previous process keep their sizes; the rest of the trials are planned afresh.
    const covered = stored.reduce((s, c) => s + c.count, 0);
    const pending: [number, number][] = [];
    const ranges = stored
      .map((c) => [c.startTrial, c.startTrial + c.count] as const)
      .sort((a, b) => a[0] - b[0]);
    let cursor = 0;
    const gaps: [number, number][] = [];
    for (const [s, e] of ranges) {
      if (s > cursor) gaps.push([cursor, s]);
      cursor = Math.max(cursor, e);
    }
    if (cursor < run.trials) gaps.push([cursor, run.trials]);
    for (const [s, e] of gaps)
      for (let t = s; t < e; t += chunkSize) pending.push([t, Math.min(chunkSize, e - t)]);
    db.update(yieldRuns)
      .set({ status: "running", progressDone: covered, startedAt: run.startedAt ?? new Date() })
      .where(and(eq(yieldRuns.id, runId), inArray(yieldRuns.status, ["queued", "running"])))
      .run();
    active = { run, study, pending, inFlight: 0, stopped: false };
    dispatch();
  }

  function dispatch() {
    const a = active;
    if (!a || closed) return;
    if (a.stopped) {
      if (a.inFlight === 0) finishActive();
      return;
    }
    while (a.pending.length > 0) {
      const pw = idleWorker();
      if (!pw) break;
      const [start, count] = a.pending.shift() as [number, number];
      a.inFlight++;
      void send(pw, { type: "chunk", runId: a.run.id, study: a.study, start, count }).then((reply) =>
        onChunk(a, reply),
      );
    }
    if (a.pending.length === 0 && a.inFlight === 0) void merge(a);
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

  function onChunk(a: ActiveRun, reply: WorkerReply) {
    a.inFlight--;
    if (closed) return;
    if (a.stopped) return dispatch();
    if (!reply.ok) {
      a.stopped = true;
      failSafely(a.run.id, `trials could not be computed: ${reply.error}`);
      return dispatch();
    }
    if (!("chunk" in reply)) {
      a.stopped = true;
      failSafely(a.run.id, "a worker answered a chunk without trials");
      return dispatch();
    }
    try {
      storeChunk(a, reply.chunk);
    } catch (err) {
      a.stopped = true;
      failSafely(a.run.id, `trials could not be stored: ${messageOf(err)}`);
    }
    dispatch();
  }

  function storeChunk(a: ActiveRun, chunk: YieldChunk) {
    const stillRunning = db.transaction((tx) => {
      const row = tx
        .select({ status: yieldRuns.status, progressDone: yieldRuns.progressDone })
        .from(yieldRuns)
        .where(eq(yieldRuns.id, a.run.id))
        .get();
      if (!row || row.status !== "running") return false;
      tx.insert(yieldChunks)
        .values({ runId: a.run.id, startTrial: chunk.startTrial, count: chunk.count, data: chunk })
        .onConflictDoNothing()
        .run();
      tx.update(yieldRuns)
        .set({ progressDone: row.progressDone + chunk.count })
        .where(eq(yieldRuns.id, a.run.id))
        .run();
      return true;
    });
    if (!stillRunning) a.stopped = true;
  }

  async function merge(a: ActiveRun) {
    a.stopped = true; // nothing more to dispatch for this run
    a.inFlight++;
    try {
      await mergeAndStore(a);
    } catch (err) {
      if (!closed) failSafely(a.run.id, `the result could not be stored: ${messageOf(err)}`);
    } finally {
      a.inFlight--;
    }
    if (!closed) finishActive();
  }

  async function mergeAndStore(a: ActiveRun) {
    const chunks = db
      .select({ data: yieldChunks.data })
      .from(yieldChunks)
      .where(eq(yieldChunks.runId, a.run.id))
      .orderBy(asc(yieldChunks.startTrial))
      .all()
      .map((c) => c.data as YieldChunk);
    const pw = idleWorker();
    let reply: WorkerReply;
    if (!pw) reply = { taskId: 0, ok: false, error: "no worker available" };
    else reply = await send(pw, { type: "merge", runId: a.run.id, study: a.study, chunks });
    if (closed) return;
    if (!reply.ok) fail(a.run.id, `trials could not be merged: ${reply.error}`);
    else if (!("result" in reply)) fail(a.run.id, "a worker answered the merge without a result");
    else {
      const current = loadRun(a.run.id);
      if (current && current.status === "running") {
        db.transaction((tx) => {
          const values = finishedRunValues(current, reply.result);
          tx.update(yieldRuns)
            .set(values)
            .where(and(eq(yieldRuns.id, a.run.id), eq(yieldRuns.status, "running")))
            .run();
          tx.delete(yieldChunks).where(eq(yieldChunks.runId, a.run.id)).run();
          const pct = (x: number) => `${(x * 100).toFixed(1)} %`;
          auditRun(
            tx,
            a.run.id,
            "yield_run.finished",
            (label) =>
              `A ${current.trials}-trial yield run on ${label} finished: ${pct(reply.result.yield)}, ` +
              (values.verified ? "verified" : `not verified (${values.mismatch ?? "mismatch"})`),
          );
        });
      }
    }
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
      db.delete(yieldChunks).where(eq(yieldChunks.runId, run.id)).run();
      recovered.failed.push(run.id);
    } else {
      db.update(yieldRuns).set({ status: "queued" }).where(eq(yieldRuns.id, run.id)).run();
      queue.push(run.id);
      recovered.resumed.push(run.id);
    }
  }
  if (queue.length > 0) setImmediate(pump);

  return {
    size,
    recovered,
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
      if (active?.run.id === runId) {
        active.stopped = true;
        dispatch();
      }
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
      closed = true;
      for (const id of [...waiters.keys()]) release(id);
      await Promise.all(workers.map((w) => w.worker.terminate()));
      workers.length = 0;
      tasks.clear();
    },
  };
}
