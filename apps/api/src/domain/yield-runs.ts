// Yield runs as the API shows them, what-if studies, and cancelling a run. The evidence run (the one the gate
// counts) is domain/evidence.ts's requestEvidenceRun; the job service (src/yield) computes and stores results.
import { and, eq, inArray } from "drizzle-orm";
import {
  ENGINE_VERSION,
  parseYieldStudy,
  type ErrorModel,
  type YieldChunk,
  type YieldResult,
  type YieldStudy,
} from "@stackproof/optics";
import type { Db } from "../db/client.ts";
import { designs, programs, revisions, yieldChunks, yieldRuns, type Role } from "../db/schema.ts";
import { recordAudit, type DbOrTx } from "../lib/audit.ts";
import { HttpError, conflict, forbidden } from "../lib/errors.ts";
import { newId } from "./canonical.ts";
import type { Actor } from "./deps.ts";
import {
  loadYieldRun,
  maskOf,
  person,
  stackOf,
  userNames,
  type RevisionContext,
  type YieldRunRow,
} from "./load.ts";
import { ClientResultSchema, verifyClientResult } from "../yield/verify.ts";

/** A run as the API shows it; `names` (requester id → person) saves the lookup when listing many runs. */
export function yieldRunView(
  db: DbOrTx,
  run: YieldRunRow,
  names: Map<string, { id: string; name: string }> = userNames(db, [run.requestedBy]),
) {
  return {
    id: run.id,
    revisionId: run.revisionId,
    status: run.status,
    progress: { done: run.progressDone, total: run.trials },
    trials: run.trials,
    seed: run.seed,
    errorModel: run.errorModel,
    result: run.result ?? null,
    verified: run.status === "done" ? (run.verified ?? null) : null,
    clientSubmitted: run.clientResult !== null && run.clientResult !== undefined,
    mismatch: run.mismatch ?? null,
    engineVersion: run.engineVersion,
    kind: run.kind,
    programVersion: run.programVersion ?? null,
    error: run.error ?? null,
    requestedBy: person(names, run.requestedBy),
    createdAt: run.createdAt.toISOString(),
    startedAt: run.startedAt ? run.startedAt.toISOString() : null,
    finishedAt: run.finishedAt ? run.finishedAt.toISOString() : null,
  };
}

/**
 * Queues a what-if yield study of a revision (any seed, trials and error model; it never counts as evidence).
 * 400 invalid_study when the optics engine refuses the study. Returns the queued run; the caller enqueues it.
 */
export function startWhatIfRun(
  db: Db,
  input: {
    workspaceId: string;
    actor: Actor;
    rc: RevisionContext;
    trials: number;
    seed: string;
    errorModel: ErrorModel;
    clientResult?: unknown;
  },
): YieldRunRow {
  const { workspaceId, actor, rc, trials, seed, errorModel } = input;
  try {
    parseYieldStudy({
      design: stackOf(rc.revision),
      mask: maskOf(rc.revision, rc.program),
      errorModel,
      trials,
      seed,
    });
  } catch (err) {
    if (err instanceof RangeError) throw new HttpError(400, "invalid_study", err.message);
    throw err;
  }
  const id = newId();
  db.transaction((tx) => {
    tx.insert(yieldRuns)
      .values({
        id,
        revisionId: rc.revision.id,
        requestedBy: actor.id,
        status: "queued",
        trials,
        seed,
        errorModel,
        clientResult: (input.clientResult ?? null) as YieldRunRow["clientResult"],
        engineVersion: ENGINE_VERSION,
        kind: "what_if",
        programVersion: rc.program.version,
        createdAt: new Date(),
      })
      .run();
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "yield_run.started",
      subjectType: "yield_run",
      subjectId: id,
      summary: `${actor.name} started a ${trials}-trial what-if yield run on ${rc.design.name} rev ${rc.revision.number}${input.clientResult ? " (verifying a browser result)" : ""}`,
    });
  });
  return db.select().from(yieldRuns).where(eq(yieldRuns.id, id)).get() as YieldRunRow;
}

/**
 * Marks a queued or running run cancelled: only the member who started it or an approver (403); a finished run is
 * 409 naming its status. Returns the run; the caller tells the job service to stop its chunks.
 */
export function cancelYieldRun(
  db: Db,
  input: { workspaceId: string; actor: Actor & { roles: readonly Role[] }; runId: string },
): YieldRunRow {
  const { workspaceId, actor } = input;
  const { run, design, revision } = loadYieldRun(db, workspaceId, input.runId);
  if (run.requestedBy !== actor.id && !actor.roles.includes("approver")) {
    throw forbidden("Only the member who started the run or an approver may cancel it.");
  }
  const changed = db.transaction((tx) => {
    const res = tx
      .update(yieldRuns)
      .set({ status: "cancelled", finishedAt: new Date(), error: `cancelled by ${actor.name}` })
      .where(and(eq(yieldRuns.id, run.id), inArray(yieldRuns.status, ["queued", "running"])))
      .run();
    if (res.changes === 1) {
      recordAudit(tx, {
        workspaceId,
        actorId: actor.id,
        action: "yield_run.cancelled",
        subjectType: "yield_run",
        subjectId: run.id,
        summary: `${actor.name} cancelled a yield run on ${design.name} rev ${revision.number}`,
      });
    }
    return res.changes;
  });
  const now = db.select().from(yieldRuns).where(eq(yieldRuns.id, run.id)).get();
  if (changed !== 1) {
    throw conflict(`The run is already ${now?.status ?? run.status}.`, { status: now?.status ?? run.status });
  }
  return now as YieldRunRow;
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

/**
 * Records an evidence run the server computed itself (so it is verified), finished: the study's seed, trials and
 * error model, its result, requested at `at` and finished at `finishedAt`. Returns the run's id. The demo seeder
 * stores its evidence runs this way; the job service stores the runs it computes chunk by chunk (src/yield).
 */
export function recordEvidenceResult(
  db: DbOrTx,
  input: {
    rc: RevisionContext;
    study: Pick<YieldStudy, "trials" | "seed" | "errorModel">;
    result: YieldResult;
    requestedBy: string;
    at: Date;
    finishedAt: Date;
    programVersion?: number;
  },
): string {
  const { rc, study, at } = input;
  const base = {
    id: newId(),
    revisionId: rc.revision.id,
    requestedBy: input.requestedBy,
    status: "running" as const,
    progressDone: 0,
    trials: study.trials,
    seed: study.seed,
    errorModel: study.errorModel,
    clientResult: null,
    result: null,
    verified: null,
    mismatch: null,
    engineVersion: ENGINE_VERSION,
    kind: "evidence" as const,
    programVersion: input.programVersion ?? rc.program.version,
    error: null,
    createdAt: at,
    startedAt: at,
    finishedAt: null,
  };
  db.insert(yieldRuns)
    .values({ ...base, ...finishedRunValues(base, input.result), finishedAt: input.finishedAt })
    .run();
  return base.id;
}

// The job service's writes (apps/api/src/yield): the run's state as its trials are computed. The system is the
// actor of their audit entries.

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

/** Marks a queued or running run failed with `error` (audited once); a finished or cancelled run is left alone. */
export function failRun(db: Db, runId: string, error: string): void {
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

/** Drops a run's stored chunks (once it is finished, failed or cancelled). */
export function dropRunChunks(db: DbOrTx, runId: string): void {
  db.delete(yieldChunks).where(eq(yieldChunks.runId, runId)).run();
}

/** A run left queued or running by a stopped server waits again for its turn (its stored chunks are kept). */
export function requeueRun(db: DbOrTx, runId: string): void {
  db.update(yieldRuns).set({ status: "queued" }).where(eq(yieldRuns.id, runId)).run();
}

/** A queued (or resumed) run starts: running, with `covered` trials already stored. */
export function markRunRunning(db: DbOrTx, run: YieldRunRow, covered: number): void {
  db.update(yieldRuns)
    .set({ status: "running", progressDone: covered, startedAt: run.startedAt ?? new Date() })
    .where(and(eq(yieldRuns.id, run.id), inArray(yieldRuns.status, ["queued", "running"])))
    .run();
}

/** Stores a chunk and the progress; false when the run is no longer running. */
export function storeRunChunk(db: Db, runId: string, chunk: YieldChunk): boolean {
  return db.transaction((tx) => {
    const row = tx
      .select({ status: yieldRuns.status, progressDone: yieldRuns.progressDone })
      .from(yieldRuns)
      .where(eq(yieldRuns.id, runId))
      .get();
    if (!row || row.status !== "running") return false;
    tx.insert(yieldChunks)
      .values({ runId, startTrial: chunk.startTrial, count: chunk.count, data: chunk })
      .onConflictDoNothing()
      .run();
    tx.update(yieldRuns)
      .set({ progressDone: row.progressDone + chunk.count })
      .where(eq(yieldRuns.id, runId))
      .run();
    return true;
  });
}

/** Stores a running run's merged result, drops its chunks and audits the outcome. */
export function storeFinishedRun(db: Db, current: YieldRunRow, result: YieldResult): void {
  db.transaction((tx) => {
    const values = finishedRunValues(current, result);
    tx.update(yieldRuns)
      .set(values)
      .where(and(eq(yieldRuns.id, current.id), eq(yieldRuns.status, "running")))
      .run();
    tx.delete(yieldChunks).where(eq(yieldChunks.runId, current.id)).run();
    const pct = (x: number) => `${(x * 100).toFixed(1)} %`;
    auditRun(
      tx,
      current.id,
      "yield_run.finished",
      (label) =>
        `A ${current.trials}-trial yield run on ${label} finished: ${pct(result.yield)}, ` +
        (values.verified ? "verified" : `not verified (${values.mismatch ?? "mismatch"})`),
    );
  });
}
