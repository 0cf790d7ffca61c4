// The release gate, workflow transitions, decisions and release records.
import type { Router } from "express";
import { and, desc, eq } from "drizzle-orm";
import { z } from "zod";
import type { AppContext } from "../../context.ts";
import { getAuth } from "../../auth/guards.ts";
import { releases, revisions } from "../../db/schema.ts";
import { notFound } from "../../lib/errors.ts";
import { keysetWhere, pageQuery, pageSchema, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import { loadRevision } from "../../domain/load.ts";
import { releasePrintHtml } from "../../domain/release-print.ts";
import { revisionView } from "../../domain/revisions.ts";
import { applyTransition, decisionViews, evaluateGate, type ReleaseSnapshot } from "../../domain/workflow.ts";
import { DecisionSchema, GateSchema, IdParams, RevisionSchema } from "@stackproof/contracts";

const TAG = "Workflow and release";

const ReleaseSummary = z.object({
  id: z.string(),
  releasedAt: z.string(),
  releasedBy: z.object({ id: z.string(), name: z.string() }),
  status: z.string(),
  program: z.object({ id: z.string(), name: z.string(), protective: z.boolean() }),
  design: z.object({ id: z.string(), name: z.string() }),
  revision: z.object({ id: z.string(), number: z.number(), hash: z.string() }),
  yield: z.object({ yield: z.number(), low: z.number(), high: z.number(), trials: z.number() }).nullable(),
});

function loadRelease(ctx: AppContext, workspaceId: string, id: string) {
  const row = ctx.db
    .select({ release: releases, status: revisions.status })
    .from(releases)
    .innerJoin(revisions, eq(releases.revisionId, revisions.id))
    .where(and(eq(releases.id, id), eq(releases.workspaceId, workspaceId)))
    .get();
  if (!row) throw notFound("Release");
  return { snapshot: row.release.snapshot as ReleaseSnapshot, status: row.status, release: row.release };
}

function summary(snapshot: ReleaseSnapshot, status: string) {
  return {
    id: snapshot.id,
    releasedAt: snapshot.releasedAt,
    releasedBy: snapshot.releasedBy,
    status,
    program: {
      id: snapshot.program.id,
      name: snapshot.program.name,
      protective: snapshot.program.protective,
    },
    design: snapshot.design,
    revision: { id: snapshot.revision.id, number: snapshot.revision.number, hash: snapshot.revision.hash },
    yield: snapshot.yieldRun
      ? {
          yield: snapshot.yieldRun.yield,
          low: snapshot.yieldRun.interval.low,
          high: snapshot.yieldRun.interval.high,
          trials: snapshot.yieldRun.trials,
        }
      : null,
  };
}

export function workflowRoutes(ctx: AppContext, router: Router): void {
  route(
    router,
    {
      method: "get",
      path: "/revisions/:id/gate",
      summary: "Release gate checks of a revision for the signed-in member",
      tag: TAG,
      access: "member",
      params: IdParams,
      query: z.object({ yieldRunId: z.string().min(1).max(100).optional() }),
      response: GateSchema,
      errors: { 404: "No such revision" },
    },
    ({ req, params, query }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const gate = evaluateGate(ctx.db, rc, auth, query.yieldRunId);
      return {
        checks: gate.checks,
        canApprove: gate.canApprove,
        canRelease: gate.canRelease,
        yieldRunId: gate.yieldRun?.id ?? null,
      };
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/revisions/:id/transitions",
      summary: "Move a revision through the workflow: submit, request_changes, approve, release, withdraw",
      tag: TAG,
      access: "member",
      params: IdParams,
      body: z.object({
        action: z.enum(["submit", "request_changes", "approve", "release", "withdraw"]),
        note: z.string().trim().max(5000).optional(),
        yieldRunId: z.string().min(1).max(100).optional(),
      }),
      response: z.object({
        revision: RevisionSchema,
        decision: DecisionSchema,
        releaseId: z.string().nullable(),
      }),
      errors: {
        403: "The role does not allow this action",
        404: "No such revision",
        409: "Not allowed from the current state (or another request changed it first)",
        422: "Approval refused by the gate; details.checks lists every failed check",
      },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const out = applyTransition(ctx, auth, params.id, body);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const decision = decisionViews(ctx.db, params.id).find((d) => d.id === out.decision.id);
      return { revision: revisionView(ctx.db, rc), decision, releaseId: out.releaseId };
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/revisions/:id/decisions",
      summary: "Immutable workflow decisions of a revision, oldest first",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: z.object({ items: z.array(DecisionSchema) }),
      errors: { 404: "No such revision" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      return { items: decisionViews(ctx.db, rc.revision.id) };
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/releases",
      summary: "Release records, newest first",
      tag: TAG,
      access: "member",
      query: pageQuery,
      response: pageSchema(ReleaseSummary),
    },
    ({ req, query }) => {
      const auth = getAuth(req);
      const rows = ctx.db
        .select({ release: releases, status: revisions.status })
        .from(releases)
        .innerJoin(revisions, eq(releases.revisionId, revisions.id))
        .where(
          and(
            eq(releases.workspaceId, auth.workspaceId),
            keysetWhere([releases.releasedAt, releases.id], query.cursor, "desc"),
          ),
        )
        .orderBy(desc(releases.releasedAt), desc(releases.id))
        .limit(query.limit + 1)
        .all();
      return toPage(
        rows,
        query.limit,
        (r) => [r.release.releasedAt, r.release.id],
        (r) => summary(r.release.snapshot as ReleaseSnapshot, r.status),
      );
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/releases/:id",
      summary: "A release record (snapshot taken at release) with the revision's current status",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: z.looseObject({ id: z.string(), status: z.string(), caution: z.string().nullable() }),
      errors: { 404: "No such release" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      const { snapshot, status } = loadRelease(ctx, auth.workspaceId, params.id);
      return { ...snapshot, status };
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/releases/:id/print",
      summary: "The release record as a printable, self-contained HTML page",
      tag: TAG,
      access: "member",
      params: IdParams,
      errors: { 404: "No such release" },
    },
    ({ req, res, params }) => {
      const auth = getAuth(req);
      const { snapshot, status } = loadRelease(ctx, auth.workspaceId, params.id);
      res
        .status(200)
        .type("html")
        .set("Content-Security-Policy", "default-src 'none'; style-src 'unsafe-inline'; img-src data:")
        .send(releasePrintHtml(snapshot, status));
      return undefined;
    },
  );
}
