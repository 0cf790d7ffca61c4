// Members of a workspace: changing roles and removing someone, never leaving the workspace without an admin.
import { and, eq, sql } from "drizzle-orm";
import type { Db } from "../db/client.ts";
import { memberships, sessions, users, type Role } from "../db/schema.ts";
import { recordAudit, type DbOrTx } from "../lib/audit.ts";
import { HttpError, notFound } from "../lib/errors.ts";
import type { Actor } from "./deps.ts";

function adminCount(tx: DbOrTx, workspaceId: string): number {
  const row = tx
    .select({ n: sql<number>`count(*)` })
    .from(memberships)
    .where(
      and(
        eq(memberships.workspaceId, workspaceId),
        sql`exists (select 1 from json_each(${memberships.roles}) where value = 'admin')`,
      ),
    )
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

export interface MemberChange {
  workspaceId: string;
  actor: Actor;
  userId: string;
}

/** Sets a member's roles: 404 when not a member, 409 last_admin when the last admin would lose the role. */
export function changeMemberRoles(db: Db, input: MemberChange & { roles: Role[] }) {
  const { workspaceId, actor, userId, roles } = input;
  return db.transaction((tx) => {
    const member = findMember(tx, workspaceId, userId);
    if (!member) throw notFound("Member");
    if (member.roles.includes("admin") && !roles.includes("admin") && adminCount(tx, workspaceId) <= 1) {
      throw lastAdmin();
    }
    tx.update(memberships)
      .set({ roles })
      .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)))
      .run();
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "member.roles_changed",
      subjectType: "member",
      subjectId: userId,
      summary: `${actor.name} changed the roles of ${member.name} from ${roleText(member.roles)} to ${roleText(roles)}.`,
      data: { before: member.roles, after: roles },
    });
    return { user: { id: userId, email: member.email, name: member.name }, roles };
  });
}

/** Removes a member from the workspace and ends their sessions in it: 404 when not a member, 409 last_admin. */
export function removeMember(db: Db, input: MemberChange): void {
  const { workspaceId, actor, userId } = input;
  db.transaction((tx) => {
    const member = findMember(tx, workspaceId, userId);
    if (!member) throw notFound("Member");
    if (member.roles.includes("admin") && adminCount(tx, workspaceId) <= 1) throw lastAdmin();
    tx.delete(memberships)
      .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)))
      .run();
    tx.delete(sessions)
      .where(and(eq(sessions.workspaceId, workspaceId), eq(sessions.userId, userId)))
      .run();
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "member.removed",
      subjectType: "member",
      subjectId: userId,
      summary: `${actor.name} removed ${member.name} (${member.email}) from the workspace.`,
      data: { roles: member.roles },
    });
  });
}

/** Makes an account a member of a workspace with `roles`, as of `at` (no audit entry: the caller's action has one). */
export function addMember(
  db: DbOrTx,
  input: { workspaceId: string; userId: string; roles: Role[]; at?: Date },
): void {
  db.insert(memberships)
    .values({
      workspaceId: input.workspaceId,
      userId: input.userId,
      roles: input.roles,
      createdAt: input.at ?? new Date(),
    })
    .run();
}
