// Invitations by e-mail: an admin invites an address with roles; the link signs the person up (or adds an existing
// account to the workspace) once, within 7 days.
import type { Router } from "express";
import { and, desc, eq, gt, isNull } from "drizzle-orm";
import { z } from "zod";
import type { AppContext } from "../../context.ts";
import { invitations, memberships, users, workspaces, type Role } from "../../db/schema.ts";
import { getAuth } from "../../auth/guards.ts";
import { luciaFor } from "../../auth/lucia.ts";
import { hashPassword, verifyPassword } from "../../auth/password.ts";
import { hashToken, newId, newToken } from "../../auth/tokens.ts";
import { recordAudit } from "../../lib/audit.ts";
import { HttpError, conflict, notFound } from "../../lib/errors.ts";
import { keysetWhere, pageQuery, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import { appUrl } from "../../mail/links.ts";
import { templates } from "../../mail/templates.ts";
import { startSession } from "./session-cookie.ts";
import {
  EmailInput,
  IdParams,
  InvitationListResponse,
  InvitationLookupSchema,
  InvitationSchema,
  NewPassword,
  PersonName,
  RolesInput,
  SessionInfo,
  TokenInput,
} from "@stackproof/contracts";

/** An invitation link works for 7 days. */
export const INVITATION_LIFETIME_MS = 7 * 24 * 60 * 60_000;

const pending = (now: Date) => and(isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, now));

const invalidInvitation = () =>
  new HttpError(404, "invalid_invitation", "This invitation link is not valid any more. Ask an admin for a new one.");

export function invitationRoutes(ctx: AppContext, router: Router): void {
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
      const rows = ctx.db
        .select({ inv: invitations, inviterName: users.name })
        .from(invitations)
        .leftJoin(users, eq(users.id, invitations.invitedBy))
        .where(
          and(
            eq(invitations.workspaceId, workspaceId),
            pending(new Date()),
            keysetWhere([invitations.createdAt, invitations.id], query.cursor, "desc"),
          ),
        )
        .orderBy(desc(invitations.createdAt), desc(invitations.id))
        .limit(query.limit + 1)
        .all();
      return toPage(rows, query.limit, (r) => [r.inv.createdAt, r.inv.id], ({ inv, inviterName }) => ({
        id: inv.id,
        email: inv.email,
        roles: inv.roles,
        createdAt: inv.createdAt.toISOString(),
        expiresAt: inv.expiresAt.toISOString(),
        invitedBy: inv.invitedBy ? { id: inv.invitedBy, name: inviterName ?? "Former member" } : null,
      }));
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
      body: z.object({ email: EmailInput, roles: RolesInput }),
      response: InvitationSchema,
      errors: { 409: "The address already belongs to a member (already_member)" },
    },
    async ({ req, body }) => {
      const auth = getAuth(req);
      const { token, hash } = newToken();
      const now = new Date();
      const expiresAt = new Date(now.getTime() + INVITATION_LIFETIME_MS);
      const id = newId();
      ctx.db.transaction((tx) => {
        const existing = tx
          .select({ userId: users.id })
          .from(users)
          .innerJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.workspaceId, auth.workspaceId)))
          .where(eq(users.email, body.email))
          .get();
        if (existing) {
          throw new HttpError(409, "already_member", `${body.email} is already a member of this workspace.`);
        }
        tx.update(invitations)
          .set({ revokedAt: now })
          .where(and(eq(invitations.workspaceId, auth.workspaceId), eq(invitations.email, body.email), pending(now)))
          .run();
        tx.insert(invitations)
          .values({
            id,
            workspaceId: auth.workspaceId,
            email: body.email,
            roles: body.roles,
            tokenHash: hash,
            invitedBy: auth.user.id,
            createdAt: now,
            expiresAt,
          })
          .run();
        recordAudit(tx, {
          workspaceId: auth.workspaceId,
          actorId: auth.user.id,
          action: "invitation.created",
          subjectType: "invitation",
          subjectId: id,
          summary: `${auth.user.name} invited ${body.email} as ${body.roles.join(", ")}.`,
          data: { email: body.email, roles: body.roles },
        });
      });
      await ctx.mail.send({
        to: body.email,
        ...templates.invitation({
          inviterName: auth.user.name,
          workspaceName: auth.workspaceName,
          roles: body.roles,
          link: appUrl(ctx.env, "/accept-invitation", { token }),
          expiresAt,
        }),
      });
      return {
        id,
        email: body.email,
        roles: body.roles,
        createdAt: now.toISOString(),
        expiresAt: expiresAt.toISOString(),
        invitedBy: { id: auth.user.id, name: auth.user.name },
      };
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
      ctx.db.transaction((tx) => {
        const now = new Date();
        const inv = tx
          .select()
          .from(invitations)
          .where(and(eq(invitations.id, params.id), eq(invitations.workspaceId, auth.workspaceId), pending(now)))
          .get();
        if (!inv) throw notFound("Pending invitation");
        tx.update(invitations).set({ revokedAt: now }).where(eq(invitations.id, inv.id)).run();
        recordAudit(tx, {
          workspaceId: auth.workspaceId,
          actorId: auth.user.id,
          action: "invitation.revoked",
          subjectType: "invitation",
          subjectId: inv.id,
          summary: `${auth.user.name} revoked the invitation of ${inv.email}.`,
        });
      });
      return undefined;
    },
  );

  function findByToken(token: string) {
    return ctx.db
      .select({ inv: invitations, workspaceName: workspaces.name })
      .from(invitations)
      .innerJoin(workspaces, eq(workspaces.id, invitations.workspaceId))
      .where(and(eq(invitations.tokenHash, hashToken(token)), pending(new Date())))
      .get();
  }

  route(
    router,
    {
      method: "get",
      path: "/invitations/lookup/:token",
      summary: "What an invitation link offers (for the accept page)",
      tag: "access",
      access: "public",
      params: z.object({ token: TokenInput }),
      response: InvitationLookupSchema,
      errors: { 404: "Unknown, used, revoked or expired (invalid_invitation)" },
    },
    ({ params }) => {
      const found = findByToken(params.token);
      if (!found) throw invalidInvitation();
      const account = ctx.db.select({ id: users.id }).from(users).where(eq(users.email, found.inv.email)).get();
      return {
        email: found.inv.email,
        workspaceName: found.workspaceName,
        roles: found.inv.roles,
        expiresAt: found.inv.expiresAt.toISOString(),
        existingAccount: account !== undefined,
      };
    },
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
      body: z.object({ token: TokenInput, name: PersonName.optional(), password: z.string().min(1).max(1000) }),
      response: SessionInfo,
      errors: {
        401: "Existing account and wrong password (invalid_credentials)",
        404: "Unknown, used, revoked or expired (invalid_invitation)",
      },
    },
    async ({ body, req, res }) => {
      const found = findByToken(body.token);
      if (!found) throw invalidInvitation();
      const { inv } = found;
      const account = ctx.db.select().from(users).where(eq(users.email, inv.email)).get();
      let passwordHash: string | null = null;
      if (account) {
        if (!(await verifyPassword(account.passwordHash, body.password))) {
          throw new HttpError(
            401,
            "invalid_credentials",
            `${inv.email} already has a Stackproof account: enter its password to join ${found.workspaceName}.`,
          );
        }
      } else {
        const name = body.name;
        if (!name) throw new HttpError(400, "validation_failed", "body.name: Enter your name.", [{ path: "name", message: "Enter your name." }]);
        const parsed = NewPassword.safeParse(body.password);
        if (!parsed.success) {
          const message = parsed.error.issues[0]?.message ?? "Choose a longer password.";
          throw new HttpError(400, "validation_failed", `body.password: ${message}`, [{ path: "password", message }]);
        }
        passwordHash = await hashPassword(body.password);
      }
      const result = ctx.db.transaction((tx) => {
        const now = new Date();
        const userId = account?.id ?? newId();
        // Another accept of the same link may have finished while the password was being hashed.
        const still = tx.select({ id: invitations.id }).from(invitations).where(and(eq(invitations.id, inv.id), pending(now))).get();
        if (!still) throw invalidInvitation();
        if (!account) {
          const taken = tx.select({ id: users.id }).from(users).where(eq(users.email, inv.email)).get();
          if (taken) throw conflict("An account for this address was just created; sign in instead.");
          tx.insert(users)
            .values({ id: userId, email: inv.email, name: body.name ?? inv.email, passwordHash: passwordHash ?? "" })
            .run();
        }
        const claimed = tx
          .update(invitations)
          .set({ acceptedAt: now, acceptedBy: userId })
          .where(and(eq(invitations.id, inv.id), pending(now)))
          .run();
        if (claimed.changes !== 1) throw invalidInvitation();
        const current = tx
          .select({ roles: memberships.roles })
          .from(memberships)
          .where(and(eq(memberships.workspaceId, inv.workspaceId), eq(memberships.userId, userId)))
          .get();
        let roles: Role[] = inv.roles;
        if (current) {
          roles = [...new Set([...current.roles, ...inv.roles])];
          tx.update(memberships)
            .set({ roles })
            .where(and(eq(memberships.workspaceId, inv.workspaceId), eq(memberships.userId, userId)))
            .run();
        } else {
          tx.insert(memberships).values({ workspaceId: inv.workspaceId, userId, roles }).run();
        }
        const user = { id: userId, email: inv.email, name: account?.name ?? body.name ?? inv.email };
        recordAudit(tx, {
          workspaceId: inv.workspaceId,
          actorId: userId,
          action: "invitation.accepted",
          subjectType: "invitation",
          subjectId: inv.id,
          summary: `${user.name} (${inv.email}) accepted the invitation and joined as ${roles.join(", ")}.`,
          data: { roles, newAccount: !account },
        });
        return { user, roles };
      });
      if (req.auth) await luciaFor(ctx.db, ctx.env).invalidateSession(req.auth.sessionId);
      return startSession(ctx, res, result.user, { id: inv.workspaceId, name: found.workspaceName }, result.roles);
    },
  );
}
