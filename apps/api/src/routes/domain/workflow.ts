// The release gate, workflow transitions, decisions and release records.
import type { Router } from "express";
import { and, desc, eq } from "drizzle-orm";
import type { AppContext } from "../../context.ts";
import { getAuth } from "../../auth/guards.ts";
import { releases, revisions } from "../../db/schema.ts";
import { notFound } from "../../lib/errors.ts";
import { keysetWhere, pageQuery, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import { loadRevision, userNames } from "../../domain/load.ts";
import {
  decideDeviation,
  deviationState,
  deviationView,
  deviationsOf,
  requestDeviation,
} from "../../domain/evidence.ts";
import { releasePrintHtml } from "../../domain/release-print.ts";
import { releasePdf } from "../../domain/release-pdf.ts";
import { revisionView } from "../../domain/revisions.ts";
import { nominalFor } from "../../yield/nominal.ts";
import { applyTransition, decisionViews, evaluateGate, type ReleaseSnapshot } from "../../domain/workflow.ts";
import {
  DecisionListResponse,
  DeviationDecisionBody,
  DeviationListResponse,
  DeviationParams,
  DeviationRequestBody,
  DeviationSchema,
  GateQuery,
  GateSchema,
  IdParams,
  ReleaseListResponse,
  ReleaseRecordSchema,
  TransitionBody,
  TransitionResponse,
} from "@stackproof/contracts";

const TAG = "Workflow and release";

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
          // Releases made before evidence rules were recorded have no bound.
          lowerBound: snapshot.evidence?.figures.lowerBound ?? null,
          confidence: snapshot.evidence?.figures.confidence ?? null,
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
      query: GateQuery,
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
        evidence: gate.evidence,
        deviation: gate.deviation,
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
      body: TransitionBody,
      response: TransitionResponse,
      errors: {
        403: "The role does not allow this action",
        404: "No such revision",
        409: "Not allowed from the current state (or another request changed it first)",
        422: "Approval refused by the gate; details.checks lists every failed check",
      },
    },
    async ({ req, params, body }) => {
      const auth = getAuth(req);
      const out = applyTransition({ db: ctx.db, mail: ctx.mail, env: ctx.env }, auth, params.id, body);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const decision = decisionViews(ctx.db, params.id).find((d) => d.id === out.decision.id);
      return {
        revision: revisionView(ctx.db, rc, await nominalFor(ctx, rc)),
        decision,
        releaseId: out.releaseId,
      };
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/revisions/:id/deviations",
      summary: "Spec deviations of a revision (its mask against the program's), oldest first",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: DeviationListResponse,
      errors: { 404: "No such revision" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const state = deviationState(ctx.db, rc);
      const rows = deviationsOf(ctx.db, [rc.revision.id]);
      const names = userNames(
        ctx.db,
        rows.flatMap((d) => [d.requestedBy, d.decidedBy]),
      );
      return {
        required: state.required,
        bands: state.bands,
        items: rows.map((d) => deviationView(d, names)),
      };
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/revisions/:id/deviations",
      summary:
        "Ask for the revision's mask to be accepted as a deviation from the program's mask (written reason)",
      tag: TAG,
      access: ["designer", "approver"],
      params: IdParams,
      body: DeviationRequestBody,
      status: 201,
      response: DeviationSchema,
      errors: {
        404: "No such revision",
        409: "The mask is the program's, or a deviation is pending or accepted",
      },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const row = requestDeviation(ctx.db, {
        revisionId: params.id,
        actor: auth.user,
        workspaceId: auth.workspaceId,
        reason: body.reason,
      });
      return deviationView(row, userNames(ctx.db, [row.requestedBy]));
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/revisions/:id/deviations/:deviationId/decision",
      summary:
        "Accept or reject a spec deviation (an approver other than its author and the revision's author)",
      tag: TAG,
      access: ["approver"],
      params: DeviationParams,
      body: DeviationDecisionBody,
      response: DeviationSchema,
      errors: {
        403: "The deviation's or the revision's author",
        404: "No such revision or deviation",
        409: "Already decided, or the program's mask changed",
      },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const row = decideDeviation(ctx.db, {
        revisionId: params.id,
        actor: { ...auth.user, roles: auth.roles },
        workspaceId: auth.workspaceId,
        deviationId: params.deviationId,
        accept: body.accept,
        note: body.note,
      });
      return deviationView(row, userNames(ctx.db, [row.requestedBy, row.decidedBy]));
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
      response: DecisionListResponse,
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
      response: ReleaseListResponse,
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
      response: ReleaseRecordSchema,
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

  route(
    router,
    {
      method: "get",
      path: "/releases/:id/pdf",
      summary:
        "The release record as a PDF (spectrum with the evidence run's envelope, margins, evidence, deviations, decisions)",
      tag: TAG,
      access: "member",
      params: IdParams,
      errors: { 404: "No such release" },
    },
    async ({ req, res, params }) => {
      const auth = getAuth(req);
      const { snapshot, status } = loadRelease(ctx, auth.workspaceId, params.id);
      const pdf = await releasePdf(snapshot, status);
      const r = snapshot as { design?: { name?: string }; revision?: { number?: number } };
      const file = `release-${String(r.design?.name ?? "record").replace(/[^A-Za-z0-9._-]+/g, "-")}-rev${r.revision?.number ?? ""}.pdf`;
      res
        .status(200)
        .type("application/pdf")
        .set("Content-Disposition", `attachment; filename="${file}"`)
        .send(pdf);
      return undefined;
    },
  );
}
