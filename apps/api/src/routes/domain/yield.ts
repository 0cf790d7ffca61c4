// Server-verified Monte Carlo yield runs.
import type { Router } from "express";
import { and, desc, eq } from "drizzle-orm";
import type { ErrorModel, YieldResult } from "@stackproof/optics";
import type { AppContext } from "../../context.ts";
import { getAuth } from "../../auth/guards.ts";
import { yieldRuns } from "../../db/schema.ts";
import { keysetWhere, pageQuery, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import { loadRevision, loadYieldRun, userNames } from "../../domain/load.ts";
import { cancelYieldRun, startWhatIfRun, yieldRunView } from "../../domain/yield-runs.ts";
import {
  evidenceFigures,
  evidencePlan,
  findEvidenceRun,
  matchesPlan,
  requestEvidenceRun,
} from "../../domain/evidence.ts";
import {
  CreateYieldRunResponse,
  EvidenceResponse,
  EvidenceRunBody,
  IdParams,
  YieldRunBody,
  YieldRunListResponse,
  YieldRunSchema,
} from "@stackproof/contracts";

const TAG = "Yield runs";

export function yieldRoutes(ctx: AppContext, router: Router): void {
  route(
    router,
    {
      method: "post",
      path: "/revisions/:id/yield-runs",
      summary:
        "Start a server yield run. Without seed, trials and error model (or with exactly the evidence run's) this is the evidence run (idempotent); anything else is a what-if study that never counts. With clientResult the browser's result is verified against it",
      tag: TAG,
      access: ["designer", "reviewer", "approver"],
      params: IdParams,
      body: YieldRunBody,
      status: 202,
      response: CreateYieldRunResponse,
      errors: {
        404: "No such revision",
        429: "A cap on yield runs queued or running at once is reached (named in the message)",
      },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      ctx.jobs.admit({ userId: auth.user.id, workspaceId: auth.workspaceId });
      const plan = evidencePlan(rc);
      const trials = body.trials ?? plan.trials;
      const seed = body.seed ?? plan.seed;
      const errorModel = (body.errorModel ?? plan.errorModel) as ErrorModel;
      // A request for exactly the evidence run's study is the evidence run (idempotent); anything else is what-if.
      if (matchesPlan({ seed, trials, errorModel }, plan)) {
        const out = requestEvidenceRun(ctx.db, {
          rc,
          actor: auth.user,
          workspaceId: auth.workspaceId,
          clientResult: body.clientResult,
        });
        if (out.created) ctx.jobs.enqueue(out.run.id);
        return { run: yieldRunView(ctx.db, out.run), reused: !out.created };
      }
      const run = startWhatIfRun(ctx.db, {
        workspaceId: auth.workspaceId,
        actor: auth.user,
        rc,
        trials,
        seed,
        errorModel,
        clientResult: body.clientResult,
      });
      ctx.jobs.enqueue(run.id);
      return { run: yieldRunView(ctx.db, run), reused: false };
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/revisions/:id/evidence",
      summary:
        "The evidence run's server-assigned parameters (seed, trials, error model) under the current program version, the run and its figures",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: EvidenceResponse,
      errors: { 404: "No such revision" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const run = findEvidenceRun(ctx.db, rc);
      const result = run?.status === "done" ? (run.result as YieldResult | null) : null;
      return {
        plan: evidencePlan(rc),
        run: run ? yieldRunView(ctx.db, run) : null,
        figures: result ? evidenceFigures(result, rc.program) : null,
      };
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/revisions/:id/evidence-run",
      summary:
        "Start the revision's evidence run (server-assigned seed and trials), or return the one that exists; with clientResult the browser's result is compared",
      tag: TAG,
      access: ["designer", "reviewer", "approver"],
      params: IdParams,
      body: EvidenceRunBody,
      status: 202,
      response: CreateYieldRunResponse,
      errors: { 404: "No such revision" },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const out = requestEvidenceRun(ctx.db, {
        rc,
        actor: auth.user,
        workspaceId: auth.workspaceId,
        clientResult: body.clientResult,
      });
      if (out.created) ctx.jobs.enqueue(out.run.id);
      return { run: yieldRunView(ctx.db, out.run), reused: !out.created };
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
      response: YieldRunListResponse,
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
      const run = cancelYieldRun(ctx.db, {
        workspaceId: auth.workspaceId,
        actor: { ...auth.user, roles: auth.roles },
        runId: params.id,
      });
      ctx.jobs.cancel(run.id);
      return yieldRunView(ctx.db, run);
    },
  );
}
