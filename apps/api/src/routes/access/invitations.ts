// Invitations by e-mail (domain/invitations.ts): an admin invites an address with roles; the link signs the person
// up (or adds an existing account to the workspace) once, within 7 days.
import type { Router } from "express";
import { and, desc, eq } from "drizzle-orm";
import type { AppContext } from "../../context.ts";
import { invitations, users } from "../../db/schema.ts";
import { getAuth } from "../../auth/guards.ts";
import { keysetWhere, pageQuery, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import { startSession } from "../../domain/accounts.ts";
import {
  acceptInvitation,
  createInvitation,
  lookupInvitation,
  pendingInvitation,
  revokeInvitation,
} from "../../domain/invitations.ts";
import {
  AcceptInvitationBody,
  IdParams,
  InvitationBody,
  InvitationListResponse,
  InvitationLookupSchema,
  InvitationSchema,
  SessionInfo,
  TokenParams,
} from "@stackproof/contracts";

export function invitationRoutes(ctx: AppContext, router: Router): void {
  const { db, env } = ctx;
  route(
    router,
    {
      method: "get",
      path: "/invitations",
      summary: "Pending invitations, newest first",
      tag: "access",
      access: ["admin"],
      query: pageQuery,
      response: InvitationListResponse,
    },
    ({ req, query }) => {
      const { workspaceId } = getAuth(req);
      const rows = db
        .select({ inv: invitations, inviterName: users.name })
        .from(invitations)
        .leftJoin(users, eq(users.id, invitations.invitedBy))
        .where(
          and(
            eq(invitations.workspaceId, workspaceId),
            pendingInvitation(new Date()),
            keysetWhere([invitations.createdAt, invitations.id], query.cursor, "desc"),
          ),
        )
        .orderBy(desc(invitations.createdAt), desc(invitations.id))
        .limit(query.limit + 1)
        .all();
      return toPage(
        rows,
        query.limit,
        (r) => [r.inv.createdAt, r.inv.id],
        ({ inv, inviterName }) => ({
          id: inv.id,
          email: inv.email,
          roles: inv.roles,
          createdAt: inv.createdAt.toISOString(),
          expiresAt: inv.expiresAt.toISOString(),
          invitedBy: inv.invitedBy ? { id: inv.invitedBy, name: inviterName ?? "Former member" } : null,
        }),
      );
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/invitations",
      summary: "Invite an e-mail address with roles; mails a single-use link (replaces a pending one)",
      tag: "access",
      access: ["admin"],
      status: 201,
      body: InvitationBody,
      response: InvitationSchema,
      errors: { 409: "The address already belongs to a member (already_member)" },
    },
    async ({ req, body }) => {
      const auth = getAuth(req);
      return createInvitation(
        { db, mail: ctx.mail, env },
        {
          workspace: { id: auth.workspaceId, name: auth.workspaceName },
          actor: auth.user,
          email: body.email,
          roles: body.roles,
        },
      );
    },
  );

  route(
    router,
    {
      method: "delete",
      path: "/invitations/:id",
      summary: "Revoke a pending invitation",
      tag: "access",
      access: ["admin"],
      params: IdParams,
      status: 204,
      errors: { 404: "No pending invitation with this id" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      revokeInvitation(db, { workspaceId: auth.workspaceId, actor: auth.user, id: params.id });
      return undefined;
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/invitations/lookup/:token",
      summary: "What an invitation link offers (for the accept page)",
      tag: "access",
      access: "public",
      params: TokenParams,
      response: InvitationLookupSchema,
      errors: { 404: "Unknown, used, revoked or expired (invalid_invitation)" },
    },
    ({ params }) => lookupInvitation(db, params.token),
  );

  route(
    router,
    {
      method: "post",
      path: "/invitations/accept",
      summary:
        "Accept an invitation: creates the account (name and new password) or, for an existing account, checks its password; signs in",
      tag: "access",
      access: "public",
      body: AcceptInvitationBody,
      response: SessionInfo,
      errors: {
        401: "Existing account and wrong password (invalid_credentials)",
        404: "Unknown, used, revoked or expired (invalid_invitation)",
      },
    },
    async ({ body, req, res }) => {
      const member = await acceptInvitation(db, body);
      const { cookie, info } = await startSession(db, env, member, req.auth?.sessionId);
      res.append("Set-Cookie", cookie);
      return info;
    },
  );
}
