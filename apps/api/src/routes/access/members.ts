// People of the workspace and their roles. Everyone may list (for @mentions); only admins change roles or remove.
import type { Router } from "express";
import { and, asc, eq } from "drizzle-orm";
import type { AppContext } from "../../context.ts";
import { memberships, users } from "../../db/schema.ts";
import { getAuth } from "../../auth/guards.ts";
import { changeMemberRoles, removeMember } from "../../domain/members.ts";
import { keysetWhere, pageQuery, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import {
  MemberListResponse,
  MemberRolesBody,
  MemberUpdateResponse,
  UserIdParams,
} from "@stackproof/contracts";

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
        .select({
          id: users.id,
          email: users.email,
          name: users.name,
          roles: memberships.roles,
          joinedAt: memberships.createdAt,
        })
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .where(
          and(
            eq(memberships.workspaceId, workspaceId),
            keysetWhere([users.name, users.id], query.cursor, "asc"),
          ),
        )
        .orderBy(asc(users.name), asc(users.id))
        .limit(query.limit + 1)
        .all();
      return toPage(
        rows,
        query.limit,
        (r) => [r.name, r.id],
        (r) => ({
          user: { id: r.id, email: r.email, name: r.name },
          roles: r.roles,
          joinedAt: r.joinedAt.toISOString(),
        }),
      );
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
      body: MemberRolesBody,
      response: MemberUpdateResponse,
      errors: {
        404: "Not a member of this workspace",
        409: "Would leave the workspace without an admin (last_admin)",
      },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      return changeMemberRoles(ctx.db, {
        workspaceId: auth.workspaceId,
        actor: auth.user,
        userId: params.userId,
        roles: body.roles,
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
      errors: {
        404: "Not a member of this workspace",
        409: "Would leave the workspace without an admin (last_admin)",
      },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      removeMember(ctx.db, { workspaceId: auth.workspaceId, actor: auth.user, userId: params.userId });
      return undefined;
    },
  );
}
