// Reads the session cookie, validates it with lucia and attaches req.auth (user, workspace, roles).
// Renews a session past half its lifetime and clears the cookie of an unknown or expired one.
import type { Request, RequestHandler, Response } from "express";
import { and, eq } from "drizzle-orm";
import type { AppContext } from "../context.ts";
import { memberships, workspaces } from "../db/schema.ts";
import type { Role } from "../db/schema.ts";
import { luciaFor } from "./lucia.ts";
import type { AuthContext } from "./types.ts";
import "./types.ts";

/** Looks up the member's roles in a workspace; null when not (or no longer) a member. */
export function loadMembership(
  ctx: AppContext,
  userId: string,
  workspaceId: string,
): { workspaceName: string; roles: Role[] } | null {
  const row = ctx.db
    .select({ roles: memberships.roles, workspaceName: workspaces.name })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .where(and(eq(memberships.userId, userId), eq(memberships.workspaceId, workspaceId)))
    .get();
  return row ?? null;
}

/** Resolves the session of a request; sets or clears the cookie as lucia asks. */
export async function authenticate(ctx: AppContext, req: Request, res: Response): Promise<AuthContext | undefined> {
  const lucia = luciaFor(ctx.db, ctx.env);
  const sessionId = lucia.readSessionCookie(req.headers.cookie ?? "");
  if (!sessionId) return undefined;
  const { session, user } = await lucia.validateSession(sessionId);
  if (!session) {
    res.append("Set-Cookie", lucia.createBlankSessionCookie().serialize());
    return undefined;
  }
  const membership = session.workspaceId ? loadMembership(ctx, user.id, session.workspaceId) : null;
  if (!session.workspaceId || !membership) {
    await lucia.invalidateSession(session.id);
    res.append("Set-Cookie", lucia.createBlankSessionCookie().serialize());
    return undefined;
  }
  if (session.fresh) res.append("Set-Cookie", lucia.createSessionCookie(session.id).serialize());
  return {
    user: { id: user.id, email: user.email, name: user.name },
    sessionId: session.id,
    workspaceId: session.workspaceId,
    workspaceName: membership.workspaceName,
    roles: membership.roles,
  };
}

export function sessionMiddleware(ctx: AppContext): RequestHandler {
  return (req, res, next) => {
    authenticate(ctx, req, res).then(
      (auth) => {
        req.auth = auth;
        next();
      },
      (err: unknown) => next(err),
    );
  };
}
