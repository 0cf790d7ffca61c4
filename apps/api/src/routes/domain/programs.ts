// Programs and the designs in them.
import type { Router } from "express";
import { and, desc, eq } from "drizzle-orm";
import { z } from "zod";
import type { AppContext } from "../../context.ts";
import { getAuth } from "../../auth/guards.ts";
import { designs, programs } from "../../db/schema.ts";
import { recordAudit } from "../../lib/audit.ts";
import { keysetWhere, pageQuery, pageSchema, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import { newId } from "../../domain/canonical.ts";
import { loadProgram } from "../../domain/load.ts";
import {
  createRevision,
  designView,
  overviewRows,
  programDesigns,
  programView,
  revisionView,
} from "../../domain/revisions.ts";
import {
  DesignSchemaOut,
  IdParams,
  NewDesignBody,
  ProgramCreateBody,
  ProgramPatchBody,
  ProgramSchema,
  RevisionSchema,
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
      response: pageSchema(ProgramSchema),
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
      const id = newId();
      const { protective: _p, ...mask } = body.specMask;
      ctx.db.transaction((tx) => {
        tx.insert(programs)
          .values({
            id,
            workspaceId: auth.workspaceId,
            name: body.name,
            customer: body.customer,
            description: body.description,
            application: body.application,
            protective: body.protective,
            targetYield: body.targetYield,
            specMask: mask,
            errorModel: body.errorModel,
            studyDefaults: body.studyDefaults,
            createdBy: auth.user.id,
            createdAt: new Date(),
          })
          .run();
        recordAudit(tx, {
          workspaceId: auth.workspaceId,
          actorId: auth.user.id,
          action: "program.created",
          subjectType: "program",
          subjectId: id,
          summary: `${auth.user.name} created the program ${body.name}`,
        });
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
      response: ProgramSchema.extend({ designs: z.array(z.unknown()) }),
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
      summary: "Edit a program (spec mask, target yield, error model, protective flag, texts)",
      tag: TAG,
      access: ["admin", "approver"],
      params: IdParams,
      body: ProgramPatchBody,
      response: ProgramSchema,
      errors: { 404: "No such program in this workspace" },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const before = loadProgram(ctx.db, auth.workspaceId, params.id);
      const changes: Partial<typeof programs.$inferInsert> = {};
      if (body.name !== undefined) changes.name = body.name;
      if (body.customer !== undefined) changes.customer = body.customer;
      if (body.description !== undefined) changes.description = body.description;
      if (body.application !== undefined) changes.application = body.application;
      if (body.protective !== undefined) changes.protective = body.protective;
      if (body.targetYield !== undefined) changes.targetYield = body.targetYield;
      if (body.specMask !== undefined) {
        const { protective: _p, ...mask } = body.specMask;
        changes.specMask = mask;
      }
      if (body.errorModel !== undefined) changes.errorModel = body.errorModel;
      if (body.studyDefaults !== undefined) changes.studyDefaults = body.studyDefaults;
      ctx.db.transaction((tx) => {
        tx.update(programs).set(changes).where(eq(programs.id, before.id)).run();
        recordAudit(tx, {
          workspaceId: auth.workspaceId,
          actorId: auth.user.id,
          action: "program.updated",
          subjectType: "program",
          subjectId: before.id,
          summary: `${auth.user.name} changed ${Object.keys(changes).join(", ")} of the program ${before.name}`,
          data: {
            before: Object.fromEntries(
              Object.keys(changes).map((k) => [k, before[k as keyof typeof before]]),
            ),
            after: changes,
          },
        });
      });
      return programView(loadProgram(ctx.db, auth.workspaceId, before.id));
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
      response: z.object({ items: z.array(DesignSchemaOut) }),
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
      response: DesignSchemaOut.extend({ design: DesignSchemaOut, revision: RevisionSchema }),
      errors: { 404: "No such program in this workspace" },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const program = loadProgram(ctx.db, auth.workspaceId, params.id);
      const { design, revision } = ctx.db.transaction((tx) => {
        const design = {
          id: newId(),
          programId: program.id,
          name: body.name,
          createdBy: auth.user.id,
          createdAt: new Date(),
        };
        tx.insert(designs).values(design).run();
        const revision = createRevision(tx, {
          workspaceId: auth.workspaceId,
          design,
          program,
          stack: body.stack,
          specMask: body.specMask,
          note: body.note,
          authorId: auth.user.id,
        });
        recordAudit(tx, {
          workspaceId: auth.workspaceId,
          actorId: auth.user.id,
          action: "design.created",
          subjectType: "design",
          subjectId: design.id,
          summary: `${auth.user.name} created the design ${design.name} in ${program.name} (rev 1)`,
          data: { revisionId: revision.id, hash: revision.hash },
        });
        return { design, revision };
      });
      const view = designView(ctx.db, design, program);
      // The design's own fields at the top level too, so the answer reads like GET /designs/:id.
      return { ...view, design: view, revision: revisionView(ctx.db, { revision, design, program }) };
    },
  );
}
