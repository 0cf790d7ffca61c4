// Starting a session for a member in a workspace, shared by sign-in and accepting an invitation.
import type { Response } from "express";
import type { AppContext } from "../../context.ts";
import type { Role } from "../../db/schema.ts";
import { luciaFor } from "../../auth/lucia.ts";
import type { SessionInfo } from "@stackproof/contracts";

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
  return { user: { id: user.id, email: user.email, name: user.name }, workspace, roles };
}
