// Review threads anchored to a revision, carried forward to later revisions of the design (domain/threads.ts).
import type { Router } from "express";
import type { AppContext } from "../../context.ts";
import { getAuth } from "../../auth/guards.ts";
import { route } from "../../lib/route.ts";
import { loadRevision, type RevisionContext, type ThreadRow } from "../../domain/load.ts";
import { nominalFor } from "../../yield/nominal.ts";
import {
  commentOnThread,
  openThread,
  setThreadStatus,
  threadViews,
  threadsForRevision,
} from "../../domain/threads.ts";
import {
  CommentBody,
  IdParams,
  NewThreadBody,
  ThreadListResponse,
  ThreadSchema,
  ThreadStatusBody,
} from "@stackproof/contracts";

const TAG = "Review threads";

export function threadRoutes(ctx: AppContext, router: Router): void {
  const deps = { db: ctx.db, mail: ctx.mail, env: ctx.env };
  /** One thread as the API shows it, its anchor evaluated on `on`. */
  const view = async (row: ThreadRow | undefined, on: RevisionContext) =>
    threadViews(ctx.db, row ? [row] : [], on, await nominalFor(ctx, on))[0];

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
      body: NewThreadBody,
      status: 201,
      response: ThreadSchema,
      errors: { 404: "No such revision", 422: "The anchor names a band or layer the revision does not have" },
    },
    async ({ req, params, body }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const row = openThread(deps, { workspaceId: auth.workspaceId, actor: auth.user, rc, ...body });
      return view(row, rc);
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
      body: CommentBody,
      status: 201,
      response: ThreadSchema,
      errors: {
        403: "Members holding only the admin role do not take part in reviews",
        404: "No such thread",
      },
    },
    async ({ req, params, body }) => {
      const auth = getAuth(req);
      const { thread, rc } = commentOnThread(deps, {
        workspaceId: auth.workspaceId,
        actor: { ...auth.user, roles: auth.roles },
        threadId: params.id,
        body: body.body,
      });
      return view(thread, rc);
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
        body: ThreadStatusBody,
        response: ThreadSchema,
        errors: {
          403: "Not a reviewer, approver or the thread's author",
          404: "No such thread",
          409: `The thread is already ${action === "resolve" ? "resolved" : "open"}`,
        },
      },
      async ({ req, params, body }) => {
        const auth = getAuth(req);
        // The anchor is evaluated on the design's latest revision, where the thread now matters.
        const { thread, rc } = setThreadStatus(deps, {
          workspaceId: auth.workspaceId,
          actor: { ...auth.user, roles: auth.roles },
          threadId: params.id,
          action,
          note: body.note,
        });
        return view(thread, rc);
      },
    );
  }
}
