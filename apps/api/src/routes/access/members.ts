// People of the workspace and their roles. Everyone may list (for @mentions); only admins change roles or remove.
import type { Router } from "express";
import { and, asc, eq, sql } from "drizzle-orm";
import { z } from "zod";
import type { AppContext } from "../../context.ts";
import { memberships, sessions, users, type Role } from "../../db/schema.ts";
import { getAuth } from "../../auth/guards.ts";
import { recordAudit, type DbOrTx } from "../../lib/audit.ts";
import { HttpError, notFound } from "../../lib/errors.ts";
import { keysetWhere, pageQuery, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import { MemberListResponse, MemberUpdateResponse, RolesInput, UserIdParams } from "@stackproof/contracts";


function adminCount(tx: DbOrTx, workspaceId: string): number {
  const row = tx
    .select({ n: sql<number>`count(*)` })
    .from(memberships)
    .where(and(eq(memberships.workspaceId, workspaceId), sql`exists (select 1 from json_each(${memberships.roles}) where value = 'admin')`))
    .get();
  return row?.n ?? 0;
}

const lastAdmin = () =>
  new HttpError(409, "last_admin", "The workspace needs at least one admin. Make someone else admin first.");

function findMember(tx: DbOrTx, workspaceId: string, userId: string) {
  return tx
    .select({ roles: memberships.roles, name: users.name, email: users.email })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)))
    .get();
}

const roleText = (roles: readonly Role[]) => roles.join(", ");

export function memberRoutes(ctx: AppContext, router: Router): void {
  route(
    router,
    {
      method: "get",
      path: "/members",
      summary: "People of the workspace with their roles, by name",
      tag: "access",
      access: "member",
      query: pageQuery,
      response: MemberListResponse,
    },
    ({ req, query }) => {
      const { workspaceId } = getAuth(req);
      const rows = ctx.db
        .select({ id: users.id, email: users.email, name: users.name, roles: memberships.roles, joinedAt: memberships.createdAt })
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .where(and(eq(memberships.workspaceId, workspaceId), keysetWhere([users.name, users.id], query.cursor, "asc")))
        .orderBy(asc(users.name), asc(users.id))
        .limit(query.limit + 1)
        .all();
      return toPage(rows, query.limit, (r) => [r.name, r.id], (r) => ({
        user: { id: r.id, email: r.email, name: r.name },
        roles: r.roles,
        joinedAt: r.joinedAt.toISOString(),
      }));
    },
  );

  route(
    router,
    {
      method: "patch",
      path: "/members/:userId",
      summary: "Change a member's roles",
      tag: "access",
      access: ["admin"],
      params: UserIdParams,
      body: z.object({ roles: RolesInput }),
      response: MemberUpdateResponse,
      errors: { 404: "Not a member of this workspace", 409: "Would leave the workspace without an admin (last_admin)" },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      return ctx.db.transaction((tx) => {
        const member = findMember(tx, auth.workspaceId, params.userId);
        if (!member) throw notFound("Member");
        if (member.roles.includes("admin") && !body.roles.includes("admin") && adminCount(tx, auth.workspaceId) <= 1) {
          throw lastAdmin();
        }
        tx.update(memberships)
          .set({ roles: body.roles })
          .where(and(eq(memberships.workspaceId, auth.workspaceId), eq(memberships.userId, params.userId)))
          .run();
        recordAudit(tx, {
          workspaceId: auth.workspaceId,
          actorId: auth.user.id,
          action: "member.roles_changed",
          subjectType: "member",
          subjectId: params.userId,
          summary: `${auth.user.name} changed the roles of ${member.name} from ${roleText(member.roles)} to ${roleText(body.roles)}.`,
          data: { before: member.roles, after: body.roles },
        });
        return { user: { id: params.userId, email: member.email, name: member.name }, roles: body.roles };
      });
    },
  );

  route(
    router,
    {
      method: "delete",
      path: "/members/:userId",
      summary: "Remove a member from the workspace (their sessions here end)",
      tag: "access",
      access: ["admin"],
      params: UserIdParams,
      status: 204,
      errors: { 404: "Not a member of this workspace", 409: "Would leave the workspace without an admin (last_admin)" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      ctx.db.transaction((tx) => {
        const member = findMember(tx, auth.workspaceId, params.userId);
        if (!member) throw notFound("Member");
        if (member.roles.includes("admin") && adminCount(tx, auth.workspaceId) <= 1) throw lastAdmin();
        tx.delete(memberships)
          .where(and(eq(memberships.workspaceId, auth.workspaceId), eq(memberships.userId, params.userId)))
          .run();
        tx.delete(sessions)
          .where(and(eq(sessions.workspaceId, auth.workspaceId), eq(sessions.userId, params.userId)))
          .run();
        recordAudit(tx, {
          workspaceId: auth.workspaceId,
          actorId: auth.user.id,
          action: "member.removed",
          subjectType: "member",
          subjectId: params.userId,
          summary: `${auth.user.name} removed ${member.name} (${member.email}) from the workspace.`,
          data: { roles: member.roles },
        });
      });
      return undefined;
    },
  );
}
