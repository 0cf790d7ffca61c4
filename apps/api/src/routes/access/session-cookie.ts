// Starting a session for a member in a workspace, shared by sign-in and accepting an invitation.
import type { Response } from "express";
import type { AppContext } from "../../context.ts";
import type { Role } from "../../db/schema.ts";
import { luciaFor } from "../../auth/lucia.ts";
import type { SessionInfo } from "@stackproof/contracts";
import { and, eq } from "drizzle-orm";
import type { Db } from "../../db/client.ts";
import { memberships, users } from "../../db/schema.ts";
import { DEMO_ACCOUNTS } from "../../demo/index.ts";

/** True when `workspaceId` is the demo workspace: the one its first demo account (the demo admin) belongs to. */
export function isDemoWorkspace(db: Db, workspaceId: string): boolean {
  const email = DEMO_ACCOUNTS[0]?.email;
  if (!email) return false;
  const row = db
    .select({ id: users.id })
    .from(users)
    .innerJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.workspaceId, workspaceId)))
    .where(eq(users.email, email))
    .get();
  return row !== undefined;
}

export async function startSession(
  ctx: AppContext,
  res: Response,
  user: { id: string; email: string; name: string },
  workspace: { id: string; name: string },
  roles: Role[],
): Promise<SessionInfo> {
  const lucia = luciaFor(ctx.db, ctx.env);
  const session = await lucia.createSession(user.id, { workspaceId: workspace.id });
  res.append("Set-Cookie", lucia.createSessionCookie(session.id).serialize());
  return {
    user: { id: user.id, email: user.email, name: user.name },
    workspace: { ...workspace, demo: isDemoWorkspace(ctx.db, workspace.id) },
    roles,
  };
}
