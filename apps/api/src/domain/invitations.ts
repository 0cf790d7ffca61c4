// Invitations by e-mail: an admin invites an address with roles; the link signs the person up (or adds an existing
// account to the workspace) once, within 7 days. Only the sha-256 of a link's token is stored.
import { and, eq, gt, isNull } from "drizzle-orm";
import type { Db } from "../db/client.ts";
import { invitations, memberships, users, workspaces, type Role } from "../db/schema.ts";
import { hashPassword, passwordProblem, verifyPassword } from "../auth/password.ts";
import { hashToken, newId, newToken } from "../auth/tokens.ts";
import { recordAudit } from "../lib/audit.ts";
import { HttpError, conflict, notFound } from "../lib/errors.ts";
import { appUrl, templates } from "../mail/index.ts";
import { createAccount, weakPassword, type SessionMember } from "./accounts.ts";
import { addMember } from "./members.ts";
import type { Actor, MailDeps } from "./deps.ts";

/** An invitation link works for 7 days. */
export const INVITATION_LIFETIME_MS = 7 * 24 * 60 * 60_000;

/** Not accepted, not revoked, not expired at `now`. */
export const pendingInvitation = (now: Date) =>
  and(isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, now));

const invalidInvitation = () =>
  new HttpError(
    404,
    "invalid_invitation",
    "This invitation link is not valid any more. Ask an admin for a new one.",
  );

/**
 * Invites `email` with `roles` (a pending invitation of the same address is revoked) and mails the link once the
 * invitation is stored. 409 already_member when the address belongs to a member. Returns the invitation as listed.
 */
export async function createInvitation(
  deps: MailDeps,
  input: { workspace: { id: string; name: string }; actor: Actor; email: string; roles: Role[] },
) {
  const { workspace, actor, email, roles } = input;
  const { token, hash } = newToken();
  const now = new Date();
  const expiresAt = new Date(now.getTime() + INVITATION_LIFETIME_MS);
  const id = newId();
  deps.db.transaction((tx) => {
    const existing = tx
      .select({ userId: users.id })
      .from(users)
      .innerJoin(
        memberships,
        and(eq(memberships.userId, users.id), eq(memberships.workspaceId, workspace.id)),
      )
      .where(eq(users.email, email))
      .get();
    if (existing) {
      throw new HttpError(409, "already_member", `${email} is already a member of this workspace.`);
    }
    tx.update(invitations)
      .set({ revokedAt: now })
      .where(
        and(eq(invitations.workspaceId, workspace.id), eq(invitations.email, email), pendingInvitation(now)),
      )
      .run();
    tx.insert(invitations)
      .values({
        id,
        workspaceId: workspace.id,
        email,
        roles,
        tokenHash: hash,
        invitedBy: actor.id,
        createdAt: now,
        expiresAt,
      })
      .run();
    recordAudit(tx, {
      workspaceId: workspace.id,
      actorId: actor.id,
      action: "invitation.created",
      subjectType: "invitation",
      subjectId: id,
      summary: `${actor.name} invited ${email} as ${roles.join(", ")}.`,
      data: { email, roles },
    });
  });
  await deps.mail.send({
    to: email,
    workspaceId: workspace.id,
    ...templates.invitation({
      inviterName: actor.name,
      workspaceName: workspace.name,
      roles,
      link: appUrl(deps.env, "/accept-invitation", { token }),
      expiresAt,
    }),
  });
  return {
    id,
    email,
    roles,
    createdAt: now.toISOString(),
    expiresAt: expiresAt.toISOString(),
    invitedBy: { id: actor.id, name: actor.name },
  };
}

/** Revokes a pending invitation of the workspace; 404 when there is none with this id. */
export function revokeInvitation(db: Db, input: { workspaceId: string; actor: Actor; id: string }): void {
  const { workspaceId, actor } = input;
  db.transaction((tx) => {
    const now = new Date();
    const inv = tx
      .select()
      .from(invitations)
      .where(
        and(eq(invitations.id, input.id), eq(invitations.workspaceId, workspaceId), pendingInvitation(now)),
      )
      .get();
    if (!inv) throw notFound("Pending invitation");
    tx.update(invitations).set({ revokedAt: now }).where(eq(invitations.id, inv.id)).run();
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "invitation.revoked",
      subjectType: "invitation",
      subjectId: inv.id,
      summary: `${actor.name} revoked the invitation of ${inv.email}.`,
    });
  });
}

/** The pending invitation of a link with its workspace's name; 404 invalid_invitation otherwise. */
function pendingByToken(db: Db, token: string) {
  const found = db
    .select({ inv: invitations, workspaceName: workspaces.name })
    .from(invitations)
    .innerJoin(workspaces, eq(workspaces.id, invitations.workspaceId))
    .where(and(eq(invitations.tokenHash, hashToken(token)), pendingInvitation(new Date())))
    .get();
  if (!found) throw invalidInvitation();
  return found;
}

/** What an invitation link offers (for the accept page). */
export function lookupInvitation(db: Db, token: string) {
  const found = pendingByToken(db, token);
  const account = db.select({ id: users.id }).from(users).where(eq(users.email, found.inv.email)).get();
  return {
    email: found.inv.email,
    workspaceName: found.workspaceName,
    roles: found.inv.roles,
    expiresAt: found.inv.expiresAt.toISOString(),
    existingAccount: account !== undefined,
  };
}

/**
 * Accepts an invitation: creates the account (name and a new password that passes the password rules) or, for an
 * existing account, checks its password (401 invalid_credentials); adds the roles to the membership. A link works
 * once: of two accepts racing, one gets 404 invalid_invitation. Returns the member to start a session for.
 */
export async function acceptInvitation(
  db: Db,
  input: { token: string; name?: string | undefined; password: string },
): Promise<SessionMember> {
  const found = pendingByToken(db, input.token);
  const { inv } = found;
  const account = db.select().from(users).where(eq(users.email, inv.email)).get();
  let passwordHash: string | null = null;
  if (account) {
    if (!(await verifyPassword(account.passwordHash, input.password))) {
      throw new HttpError(
        401,
        "invalid_credentials",
        `${inv.email} already has a Stackproof account: enter its password to join ${found.workspaceName}.`,
      );
    }
  } else {
    const name = input.name;
    if (!name)
      throw new HttpError(400, "validation_failed", "body.name: Enter your name.", [
        { path: "name", message: "Enter your name." },
      ]);
    const problem = passwordProblem(input.password, [inv.email, name]);
    if (problem) throw weakPassword(problem);
    passwordHash = await hashPassword(input.password);
  }
  const result = db.transaction((tx) => {
    const now = new Date();
    // Another accept of the same link may have finished while the password was being hashed.
    const still = tx
      .select({ id: invitations.id })
      .from(invitations)
      .where(and(eq(invitations.id, inv.id), pendingInvitation(now)))
      .get();
    if (!still) throw invalidInvitation();
    let userId = account?.id;
    if (!userId) {
      const taken = tx.select({ id: users.id }).from(users).where(eq(users.email, inv.email)).get();
      if (taken) throw conflict("An account for this address was just created; sign in instead.");
      userId = createAccount(tx, {
        email: inv.email,
        name: input.name ?? inv.email,
        passwordHash: passwordHash ?? "",
      });
    }
    const claimed = tx
      .update(invitations)
      .set({ acceptedAt: now, acceptedBy: userId })
      .where(and(eq(invitations.id, inv.id), pendingInvitation(now)))
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
      addMember(tx, { workspaceId: inv.workspaceId, userId, roles });
    }
    const user = { id: userId, email: inv.email, name: account?.name ?? input.name ?? inv.email };
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
  return {
    user: result.user,
    workspace: { id: inv.workspaceId, name: found.workspaceName },
    roles: result.roles,
  };
}
