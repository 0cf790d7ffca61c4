// Review threads anchored to a revision, carried forward to later revisions of the design.
import type { Router } from "express";
import { and, desc, eq } from "drizzle-orm";
import { z } from "zod";
import type { AppContext } from "../../context.ts";
import type { AuthContext } from "../../auth/types.ts";
import { getAuth } from "../../auth/guards.ts";
import { comments, revisions, threads } from "../../db/schema.ts";
import { recordAudit, type DbOrTx } from "../../lib/audit.ts";
import { HttpError, conflict, forbidden } from "../../lib/errors.ts";
import { route } from "../../lib/route.ts";
import { newId } from "../../domain/canonical.ts";
import { loadRevision, loadThread, maskOf, stackOf, type RevisionContext } from "../../domain/load.ts";
import { mailMention } from "../../domain/notify.ts";
import { nominalFor } from "../../yield/nominal.ts";
import { findMentions, threadViews, threadsForRevision, workspaceMembers } from "../../domain/threads.ts";
import { AnchorSchema, CommentBodySchema, IdParams, ThreadListResponse, ThreadSchema } from "@stackproof/contracts";

const TAG = "Review threads";

function revisionOfThread(ctx: AppContext, workspaceId: string, revisionId: string): RevisionContext {
  return loadRevision(ctx.db, workspaceId, revisionId);
}

function addComment(db: DbOrTx, auth: AuthContext, threadId: string, body: string) {
  const members = workspaceMembers(db, auth.workspaceId);
  const mentioned = findMentions(body, members).filter((m) => m.id !== auth.user.id);
  const comment = {
    id: newId(),
    threadId,
    authorId: auth.user.id,
    body,
    mentions: mentioned.map((m) => m.id),
    createdAt: new Date(),
  };
  db.insert(comments).values(comment).run();
  return { comment, mentioned };
}

export function threadRoutes(ctx: AppContext, router: Router): void {
  route(
    router,
    {
      method: "get",
      path: "/revisions/:id/threads",
      summary:
        "Threads opened on this revision or an earlier one of its design; anchorPasses evaluated on this revision",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: ThreadListResponse,
      errors: { 404: "No such revision" },
    },
    async ({ req, params }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      return { items: threadViews(ctx.db, threadsForRevision(ctx.db, rc), rc, await nominalFor(ctx, rc)) };
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/revisions/:id/threads",
      summary: "Open a review thread with its first comment",
      tag: TAG,
      access: ["reviewer", "approver", "designer"],
      params: IdParams,
      body: z.object({
        anchor: AnchorSchema,
        severity: z.enum(["blocking", "advisory"]),
        body: CommentBodySchema,
      }),
      status: 201,
      response: ThreadSchema,
      errors: { 404: "No such revision", 422: "The anchor names a band or layer the revision does not have" },
    },
    async ({ req, params, body }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const anchor = body.anchor;
      if (
        anchor.kind === "band" &&
        // a band or a colour requirement (they share ids)
        ![...maskOf(rc.revision, rc.program).bands, ...(maskOf(rc.revision, rc.program).colour ?? [])].some(
          (b) => b.id === anchor.bandId,
        )
      ) {
        throw new HttpError(
          422,
          "unknown_anchor",
          `Revision ${rc.revision.number} has no spec band "${anchor.bandId}".`,
        );
      }
      if (anchor.kind === "layer" && anchor.index >= stackOf(rc.revision).layers.length) {
        throw new HttpError(
          422,
          "unknown_anchor",
          `Revision ${rc.revision.number} has ${stackOf(rc.revision).layers.length} layers; there is no layer ${anchor.index}.`,
        );
      }
      const id = newId();
      const mentioned = ctx.db.transaction((tx) => {
        tx.insert(threads)
          .values({
            id,
            designId: rc.design.id,
            revisionId: rc.revision.id,
            revisionNumber: rc.revision.number,
            anchor,
            severity: body.severity,
            authorId: auth.user.id,
          })
          .run();
        const { mentioned } = addComment(tx, auth, id, body.body);
        recordAudit(tx, {
          workspaceId: auth.workspaceId,
          actorId: auth.user.id,
          action: "thread.opened",
          subjectType: "thread",
          subjectId: id,
          summary: `${auth.user.name} opened a ${body.severity} thread on ${rc.design.name} rev ${rc.revision.number}`,
        });
        return mentioned;
      });
      for (const m of mentioned) mailMention(ctx, rc, m, auth.user.name, body.body);
      const row = ctx.db.select().from(threads).where(eq(threads.id, id)).get();
      return threadViews(ctx.db, row ? [row] : [], rc, await nominalFor(ctx, rc))[0];
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/threads/:id/comments",
      summary: "Comment on a thread; @name or @email mentions mail the member",
      tag: TAG,
      access: "member",
      params: IdParams,
      body: z.object({ body: CommentBodySchema }),
      status: 201,
      response: ThreadSchema,
      errors: {
        403: "Members holding only the admin role do not take part in reviews",
        404: "No such thread",
      },
    },
    async ({ req, params, body }) => {
      const auth = getAuth(req);
      if (!auth.roles.some((r) => r !== "admin"))
        throw forbidden("Commenting needs a designer, reviewer or approver role.");
      const { thread } = loadThread(ctx.db, auth.workspaceId, params.id);
      const rc = revisionOfThread(ctx, auth.workspaceId, thread.revisionId);
      const mentioned = ctx.db.transaction((tx) => {
        const { mentioned } = addComment(tx, auth, thread.id, body.body);
        recordAudit(tx, {
          workspaceId: auth.workspaceId,
          actorId: auth.user.id,
          action: "thread.commented",
          subjectType: "thread",
          subjectId: thread.id,
          summary: `${auth.user.name} commented on a thread of ${rc.design.name}`,
        });
        return mentioned;
      });
      for (const m of mentioned) mailMention(ctx, rc, m, auth.user.name, body.body);
      const row = ctx.db.select().from(threads).where(eq(threads.id, thread.id)).get();
      return threadViews(ctx.db, row ? [row] : [], rc, await nominalFor(ctx, rc))[0];
    },
  );

  for (const action of ["resolve", "reopen"] as const) {
    route(
      router,
      {
        method: "post",
        path: `/threads/:id/${action}`,
        summary: action === "resolve" ? "Resolve a thread" : "Reopen a resolved thread",
        tag: TAG,
        access: "member",
        params: IdParams,
        body: z.object({ note: z.string().trim().max(10000).optional() }),
        response: ThreadSchema,
        errors: {
          403: "Not a reviewer, approver or the thread's author",
          404: "No such thread",
          409: `The thread is already ${action === "resolve" ? "resolved" : "open"}`,
        },
      },
      async ({ req, params, body }) => {
        const auth = getAuth(req);
        const { thread } = loadThread(ctx.db, auth.workspaceId, params.id);
        if (
          thread.authorId !== auth.user.id &&
          !auth.roles.includes("reviewer") &&
          !auth.roles.includes("approver")
        ) {
          throw forbidden(`Only a reviewer, an approver or the thread's author may ${action} it.`);
        }
        const rc = revisionOfThread(ctx, auth.workspaceId, thread.revisionId);
        const from = action === "resolve" ? "open" : "resolved";
        const to = action === "resolve" ? "resolved" : "open";
        const mentioned = ctx.db.transaction((tx) => {
          const res = tx
            .update(threads)
            .set(
              to === "resolved"
                ? { status: to, resolvedAt: new Date(), resolvedBy: auth.user.id }
                : { status: to, resolvedAt: null, resolvedBy: null },
            )
            .where(and(eq(threads.id, thread.id), eq(threads.status, from)))
            .run();
          if (res.changes !== 1) throw conflict(`The thread is already ${to}.`);
          let mentioned: ReturnType<typeof addComment>["mentioned"] = [];
          if (body.note) mentioned = addComment(tx, auth, thread.id, body.note).mentioned;
          recordAudit(tx, {
            workspaceId: auth.workspaceId,
            actorId: auth.user.id,
            action: action === "resolve" ? "thread.resolved" : "thread.reopened",
            subjectType: "thread",
            subjectId: thread.id,
            summary: `${auth.user.name} ${action === "resolve" ? "resolved" : "reopened"} a ${thread.severity} thread on ${rc.design.name}`,
          });
          return mentioned;
        });
        for (const m of mentioned) mailMention(ctx, rc, m, auth.user.name, body.note ?? "");
        // Evaluate the anchor on the design's latest revision, where the thread now matters.
        const latest = ctx.db
          .select()
          .from(revisions)
          .where(eq(revisions.designId, thread.designId))
          .orderBy(desc(revisions.number))
          .get();
        const on = latest ? { ...rc, revision: latest } : rc;
        const row = ctx.db.select().from(threads).where(eq(threads.id, thread.id)).get();
        return threadViews(ctx.db, row ? [row] : [], on, await nominalFor(ctx, on))[0];
      },
    );
  }
}
