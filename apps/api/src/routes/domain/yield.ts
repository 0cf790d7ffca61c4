// Server-verified Monte Carlo yield runs.
import type { Router } from "express";
import { and, desc, eq, inArray } from "drizzle-orm";
import { z } from "zod";
import {
  ENGINE_VERSION,
  ErrorModelSchema,
  MAX_TRIALS,
  parseYieldStudy,
  type ErrorModel,
} from "@stackproof/optics";
import type { AppContext } from "../../context.ts";
import { getAuth } from "../../auth/guards.ts";
import { yieldRuns } from "../../db/schema.ts";
import { recordAudit, type DbOrTx } from "../../lib/audit.ts";
import { HttpError, conflict, forbidden } from "../../lib/errors.ts";
import { keysetWhere, pageQuery, pageSchema, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import { newId } from "../../domain/canonical.ts";
import {
  loadRevision,
  loadYieldRun,
  maskOf,
  person,
  stackOf,
  userNames,
  type YieldRunRow,
} from "../../domain/load.ts";
import { ClientResultSchema } from "../../yield/verify.ts";
import { IdParams, YieldRunSchema } from "@stackproof/contracts";

const TAG = "Yield runs";

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
    error: run.error ?? null,
    requestedBy: person(names, run.requestedBy),
    createdAt: run.createdAt.toISOString(),
    startedAt: run.startedAt ? run.startedAt.toISOString() : null,
    finishedAt: run.finishedAt ? run.finishedAt.toISOString() : null,
  };
}

export function yieldRoutes(ctx: AppContext, router: Router): void {
  route(
    router,
    {
      method: "post",
      path: "/revisions/:id/yield-runs",
      summary: "Start a server yield run; with clientResult the browser's result is verified against it",
      tag: TAG,
      access: ["designer", "reviewer", "approver"],
      params: IdParams,
      body: z.object({
        trials: z.number().int().min(1).max(MAX_TRIALS).optional(),
        seed: z.string().min(1).max(200).optional(),
        errorModel: ErrorModelSchema.optional(),
        clientResult: ClientResultSchema.optional(),
      }),
      status: 202,
      response: z.object({ run: YieldRunSchema }),
      errors: { 404: "No such revision" },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const trials = body.trials ?? rc.program.studyDefaults.trials;
      const seed = body.seed ?? rc.program.studyDefaults.seed;
      const errorModel = (body.errorModel ?? rc.program.errorModel) as ErrorModel;
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
      ctx.db.transaction((tx) => {
        tx.insert(yieldRuns)
          .values({
            id,
            revisionId: rc.revision.id,
            requestedBy: auth.user.id,
            status: "queued",
            trials,
            seed,
            errorModel,
            clientResult: body.clientResult ?? null,
            engineVersion: ENGINE_VERSION,
            createdAt: new Date(),
          })
          .run();
        recordAudit(tx, {
          workspaceId: auth.workspaceId,
          actorId: auth.user.id,
          action: "yield_run.started",
          subjectType: "yield_run",
          subjectId: id,
          summary: `${auth.user.name} started a ${trials}-trial yield run on ${rc.design.name} rev ${rc.revision.number}${body.clientResult ? " (verifying a browser result)" : ""}`,
        });
      });
      ctx.jobs.enqueue(id);
      const run = ctx.db.select().from(yieldRuns).where(eq(yieldRuns.id, id)).get() as YieldRunRow;
      return { run: yieldRunView(ctx.db, run) };
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/revisions/:id/yield-runs",
      summary: "Yield runs of a revision, newest first",
      tag: TAG,
      access: "member",
      params: IdParams,
      query: pageQuery,
      response: pageSchema(YieldRunSchema),
      errors: { 404: "No such revision" },
    },
    ({ req, params, query }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const rows = ctx.db
        .select()
        .from(yieldRuns)
        .where(
          and(
            eq(yieldRuns.revisionId, rc.revision.id),
            keysetWhere([yieldRuns.createdAt, yieldRuns.id], query.cursor, "desc"),
          ),
        )
        .orderBy(desc(yieldRuns.createdAt), desc(yieldRuns.id))
        .limit(query.limit + 1)
        .all();
      const names = userNames(
        ctx.db,
        rows.map((r) => r.requestedBy),
      );
      return toPage(
        rows,
        query.limit,
        (r) => [r.createdAt, r.id],
        (r) => yieldRunView(ctx.db, r, names),
      );
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/yield-runs/:id",
      summary: "One yield run with progress and, when done, its result and verification",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: YieldRunSchema,
      errors: { 404: "No such yield run" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      return yieldRunView(ctx.db, loadYieldRun(ctx.db, auth.workspaceId, params.id).run);
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/yield-runs/:id/cancel",
      summary: "Cancel a queued or running yield run (the member who started it, or an approver)",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: YieldRunSchema,
      errors: {
        403: "Neither the requester nor an approver",
        404: "No such yield run",
        409: "The run has already finished",
      },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      const { run, design, revision } = loadYieldRun(ctx.db, auth.workspaceId, params.id);
      if (run.requestedBy !== auth.user.id && !auth.roles.includes("approver")) {
        throw forbidden("Only the member who started the run or an approver may cancel it.");
      }
      const changed = ctx.db.transaction((tx) => {
        const res = tx
          .update(yieldRuns)
          .set({ status: "cancelled", finishedAt: new Date(), error: `cancelled by ${auth.user.name}` })
          .where(and(eq(yieldRuns.id, run.id), inArray(yieldRuns.status, ["queued", "running"])))
          .run();
        if (res.changes === 1) {
          recordAudit(tx, {
            workspaceId: auth.workspaceId,
            actorId: auth.user.id,
            action: "yield_run.cancelled",
            subjectType: "yield_run",
            subjectId: run.id,
            summary: `${auth.user.name} cancelled a yield run on ${design.name} rev ${revision.number}`,
          });
        }
        return res.changes;
      });
      if (changed !== 1) {
        const now = ctx.db
          .select({ status: yieldRuns.status })
          .from(yieldRuns)
          .where(eq(yieldRuns.id, run.id))
          .get();
        throw conflict(`The run is already ${now?.status ?? run.status}.`, {
          status: now?.status ?? run.status,
        });
      }
      ctx.jobs.cancel(run.id);
      return yieldRunView(
        ctx.db,
        ctx.db.select().from(yieldRuns).where(eq(yieldRuns.id, run.id)).get() as YieldRunRow,
      );
    },
  );
}
