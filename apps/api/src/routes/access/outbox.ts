// Captured e-mail (capture mode only: no SMTP_HOST; in production only with MAIL_CAPTURE=true). Admins only, and
// only mail sent for their workspace (or account mail to one of its members); password-reset and invitation links are hidden
// from everyone but their addressee (mail/outbox.ts). With a real SMTP host these answer 404.
import type { Router } from "express";
import { eq } from "drizzle-orm";
import type { AppContext } from "../../context.ts";
import { memberships, users } from "../../db/schema.ts";
import { getAuth } from "../../auth/guards.ts";
import type { AuthContext } from "../../auth/types.ts";
import { HttpError, notFound } from "../../lib/errors.ts";
import { pageQuery } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import type { OutboxViewer } from "../../mail/outbox.ts";
import { IdParams, OutboxDetail, OutboxListResponse } from "@stackproof/contracts";

export function outboxRoutes(ctx: AppContext, router: Router): void {
  const outbox = () => {
    if (!ctx.mail.outbox) {
      throw new HttpError(
        404,
        "outbox_disabled",
        "E-mail goes to a real SMTP server; there is no local outbox.",
      );
    }
    return ctx.mail.outbox;
  };

  /** The reader's workspace and its members' addresses. */
  function viewerOf(auth: AuthContext): OutboxViewer {
    const members = ctx.db
      .select({ email: users.email })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(eq(memberships.workspaceId, auth.workspaceId))
      .all();
    return {
      workspaceId: auth.workspaceId,
      recipients: members.map((r) => r.email.toLowerCase()),
      self: auth.user.email,
    };
  }

  route(
    router,
    {
      method: "get",
      path: "/outbox",
      summary:
        "E-mails to people of this workspace captured by the local SMTP server, newest first (capture mode only)",
      tag: "access",
      access: ["admin"],
      query: pageQuery,
      response: OutboxListResponse,
      errors: { 404: "A real SMTP host is configured (outbox_disabled)" },
    },
    ({ req, query }) => outbox().list(viewerOf(getAuth(req)), query),
  );

  route(
    router,
    {
      method: "get",
      path: "/outbox/:id",
      summary:
        "One captured e-mail with its text and HTML; single-use links (reset, invitation) hidden unless you are its addressee",
      tag: "access",
      access: ["admin"],
      params: IdParams,
      response: OutboxDetail,
      errors: {
        404: "Unknown message, mail to someone outside this workspace, or a real SMTP host is configured (outbox_disabled)",
      },
    },
    ({ req, params }) => {
      const message = outbox().get(viewerOf(getAuth(req)), params.id);
      if (!message) throw notFound("Message");
      return message;
    },
  );
}
