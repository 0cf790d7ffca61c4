// Programs and the designs in them.
import type { Router } from "express";
import { and, desc, eq } from "drizzle-orm";
import type { AppContext } from "../../context.ts";
import { getAuth } from "../../auth/guards.ts";
import { programs } from "../../db/schema.ts";
import { createProgram, programVersionsOf, updateProgram, type ProgramInput } from "../../domain/programs.ts";
import { keysetWhere, pageQuery, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import { loadProgram, person, userNames } from "../../domain/load.ts";
import {
  createDesign,
  notComputable,
  revisionInput,
  designView,
  overviewRows,
  programDesigns,
  programView,
  revisionView,
} from "../../domain/revisions.ts";
import {
  CreateDesignResponse,
  IdParams,
  NewDesignBody,
  ProgramCreateBody,
  ProgramDesignsResponse,
  ProgramDetailSchema,
  ProgramListResponse,
  ProgramPatchBody,
  ProgramSchema,
  ProgramVersionsResponse,
} from "@stackproof/contracts";

const TAG = "Programs";

export function programRoutes(ctx: AppContext, router: Router): void {
  route(
    router,
    {
      method: "get",
      path: "/programs",
      summary: "Programs of the workspace, newest first",
      tag: TAG,
      access: "member",
      query: pageQuery,
      response: ProgramListResponse,
    },
    ({ req, query }) => {
      const auth = getAuth(req);
      const rows = ctx.db
        .select()
        .from(programs)
        .where(
          and(
            eq(programs.workspaceId, auth.workspaceId),
            keysetWhere([programs.createdAt, programs.id], query.cursor, "desc"),
          ),
        )
        .orderBy(desc(programs.createdAt), desc(programs.id))
        .limit(query.limit + 1)
        .all();
      return toPage(rows, query.limit, (r) => [r.createdAt, r.id], programView);
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/programs",
      summary: "Create a program",
      tag: TAG,
      access: ["admin", "approver"],
      body: ProgramCreateBody,
      status: 201,
      response: ProgramSchema,
    },
    ({ req, body }) => {
      const auth = getAuth(req);
      const { protective: _p, ...mask } = body.specMask;
      const id = createProgram(ctx.db, {
        workspaceId: auth.workspaceId,
        actor: auth.user,
        program: { ...body, specMask: mask },
      });
      return programView(loadProgram(ctx.db, auth.workspaceId, id));
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/programs/:id",
      summary: "A program with a summary of its designs",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: ProgramDetailSchema,
      errors: { 404: "No such program in this workspace" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      const program = loadProgram(ctx.db, auth.workspaceId, params.id);
      return {
        ...programView(program),
        designs: overviewRows(
          ctx.db,
          programDesigns(ctx.db, program).map((design) => ({ design, program })),
        ),
      };
    },
  );

  route(
    router,
    {
      method: "patch",
      path: "/programs/:id",
      summary:
        "Edit a program; a change of an evidence rule (mask, error model, target, minimum trials, confidence) makes a new version",
      tag: TAG,
      access: ["admin", "approver"],
      params: IdParams,
      body: ProgramPatchBody,
      response: ProgramSchema,
      errors: { 404: "No such program in this workspace" },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const { note, specMask, ...rest } = body;
      const changes: Partial<ProgramInput> = { ...rest };
      if (specMask !== undefined) {
        const { protective: _p, ...mask } = specMask;
        changes.specMask = mask;
      }
      updateProgram(ctx.db, {
        workspaceId: auth.workspaceId,
        actor: auth.user,
        programId: params.id,
        changes,
        note,
      });
      return programView(loadProgram(ctx.db, auth.workspaceId, params.id));
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/programs/:id/versions",
      summary:
        "Every version of the program's evidence rules, oldest first, with who changed what from what to what",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: ProgramVersionsResponse,
      errors: { 404: "No such program in this workspace" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      const program = loadProgram(ctx.db, auth.workspaceId, params.id);
      const rows = programVersionsOf(ctx.db, program.id);
      const names = userNames(
        ctx.db,
        rows.map((r) => r.changedBy),
      );
      return {
        items: rows.map((v) => ({
          version: v.version,
          targetYield: v.targetYield,
          minEvidenceTrials: v.minEvidenceTrials,
          confidence: v.confidence,
          specMask: v.specMask,
          errorModel: v.errorModel,
          changes: v.changes as Record<string, { before: unknown; after: unknown }>,
          changedBy: person(names, v.changedBy),
          note: v.note,
          createdAt: v.createdAt.toISOString(),
        })),
      };
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/programs/:id/designs",
      summary: "Designs of a program",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: ProgramDesignsResponse,
      errors: { 404: "No such program in this workspace" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      const program = loadProgram(ctx.db, auth.workspaceId, params.id);
      return { items: programDesigns(ctx.db, program).map((d) => designView(ctx.db, d, program)) };
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/programs/:id/designs",
      summary: "Create a design and its revision 1",
      tag: TAG,
      access: ["designer"],
      params: IdParams,
      body: NewDesignBody,
      status: 201,
      response: CreateDesignResponse,
      errors: { 404: "No such program in this workspace" },
    },
    async ({ req, params, body }) => {
      const auth = getAuth(req);
      const program = loadProgram(ctx.db, auth.workspaceId, params.id);
      // Evaluated on the worker pool first: a heavy design never holds the request thread.
      const input = revisionInput(ctx.db, {
        workspaceId: auth.workspaceId,
        program,
        stack: body.stack,
        specMask: body.specMask,
      });
      const nominal = await ctx.compute.evaluateSpec(input.stack, input.evalMask).catch(notComputable);
      const { design, revision } = createDesign(ctx.db, {
        workspaceId: auth.workspaceId,
        actor: auth.user,
        program,
        name: body.name,
        stack: body.stack,
        specMask: body.specMask,
        note: body.note,
        evaluated: true,
      });
      const view = designView(ctx.db, design, program);
      // The design's own fields at the top level too, so the answer reads like GET /designs/:id.
      return {
        ...view,
        design: view,
        revision: revisionView(ctx.db, { revision, design, program }, nominal),
      };
    },
  );
}
