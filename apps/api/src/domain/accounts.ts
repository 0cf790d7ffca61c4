// Accounts: checking a password at sign-in, sessions, and password reset by e-mail. The routes keep what is HTTP
// (cookies on the response, the rate limits); every write to users, sessions and reset links happens here.
import { and, asc, eq, gt, isNull } from "drizzle-orm";
import type { SessionInfo } from "@stackproof/contracts";
import type { Db } from "../db/client.ts";
import type { Env } from "../env.ts";
import { memberships, passwordResets, sessions, users, workspaces, type Role } from "../db/schema.ts";
import { luciaFor } from "../auth/lucia.ts";
import {
  hashPassword,
  normalizeEmail,
  passwordProblem,
  verifyAgainstDummy,
  verifyPassword,
} from "../auth/password.ts";
import { hashToken, newId, newToken } from "../auth/tokens.ts";
import { recordAudit, type DbOrTx } from "../lib/audit.ts";
import { HttpError } from "../lib/errors.ts";
import { appUrl, templates } from "../mail/index.ts";
import type { MailDeps } from "./deps.ts";
import { isDemoWorkspace } from "./workspaces.ts";

/**
 * Stores an account with an already hashed password (argon2id, auth/password.ts), as of `at`; returns its id. The
 * caller checks that the address is free (the unique index refuses a second account anyway).
 */
export function createAccount(
  db: DbOrTx,
  input: { email: string; name: string; passwordHash: string; at?: Date },
): string {
  const id = newId();
  db.insert(users)
    .values({
      id,
      email: input.email,
      name: input.name,
      passwordHash: input.passwordHash,
      createdAt: input.at ?? new Date(),
    })
    .run();
  return id;
}

/** A reset link works for one hour. */
export const RESET_LIFETIME_MS = 60 * 60_000;

/** 400 weak_password, naming why (too short, or what zxcvbn found guessable). */
export const weakPassword = (problem: string) =>
  new HttpError(400, "weak_password", problem, [{ path: "password", message: problem }]);

export interface SessionMember {
  user: { id: string; email: string; name: string };
  workspace: { id: string; name: string };
  roles: Role[];
}

/**
 * The account and its first workspace for an e-mail and password: 401 invalid_credentials when they do not match
 * (the same time is spent when the account does not exist), 403 no_membership for an account in no workspace.
 */
export async function checkCredentials(db: Db, email: string, password: string): Promise<SessionMember> {
  const user = db.select().from(users).where(eq(users.email, email)).get();
  const ok = user ? await verifyPassword(user.passwordHash, password) : await verifyAgainstDummy(password);
  if (!user || !ok) {
    throw new HttpError(
      401,
      "invalid_credentials",
      "That e-mail address and password do not match an account.",
    );
  }
  const membership = db
    .select({ roles: memberships.roles, id: workspaces.id, name: workspaces.name })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .where(eq(memberships.userId, user.id))
    .orderBy(asc(memberships.createdAt))
    .get();
  if (!membership) {
    throw new HttpError(
      403,
      "no_membership",
      "This account is not a member of any workspace. Ask an admin to invite you.",
    );
  }
  return {
    user: { id: user.id, email: user.email, name: user.name },
    workspace: { id: membership.id, name: membership.name },
    roles: membership.roles,
  };
}

/** What GET /auth/me and a new session answer: the member, the workspace (flagged when it is the demo) and roles. */
export function sessionInfo(db: Db, member: SessionMember): SessionInfo {
  return {
    user: { id: member.user.id, email: member.user.email, name: member.user.name },
    workspace: { ...member.workspace, demo: isDemoWorkspace(db, member.workspace.id) },
    roles: member.roles,
  };
}

/**
 * Starts a session for a member in a workspace (ending `replacing`, the session the request came with, first).
 * Returns the Set-Cookie value for the route to send and the session's description.
 */
export async function startSession(
  db: Db,
  env: Env,
  member: SessionMember,
  replacing?: string,
): Promise<{ cookie: string; info: SessionInfo }> {
  const lucia = luciaFor(db, env);
  if (replacing) await lucia.invalidateSession(replacing);
  const session = await lucia.createSession(member.user.id, { workspaceId: member.workspace.id });
  return { cookie: lucia.createSessionCookie(session.id).serialize(), info: sessionInfo(db, member) };
}

/** Ends a session; returns the Set-Cookie value that clears the cookie. */
export async function endSession(db: Db, env: Env, sessionId: string): Promise<string> {
  const lucia = luciaFor(db, env);
  await lucia.invalidateSession(sessionId);
  return lucia.createBlankSessionCookie().serialize();
}

/** Deletes expired sessions (those met again are deleted when validated; this removes the ones never seen again). */
export async function deleteExpiredSessions(db: Db, env: Env): Promise<void> {
  await luciaFor(db, env).deleteExpiredSessions();
}

/**
 * Stores a single-use reset link for the account of `email` and mails it, when there is such an account and
 * `mayMail(userId)` allows another mail to it. Does nothing otherwise: the caller answers the same either way.
 * The mail is not awaited, so the answer takes no longer when the account exists.
 */
export function requestPasswordReset(
  deps: MailDeps,
  email: string,
  mayMail: (userId: string) => boolean,
): void {
  const user = deps.db
    .select()
    .from(users)
    .where(eq(users.email, normalizeEmail(email)))
    .get();
  if (!user || !mayMail(user.id)) return;
  const { token, hash } = newToken();
  const now = new Date();
  deps.db
    .insert(passwordResets)
    .values({
      id: newId(),
      userId: user.id,
      tokenHash: hash,
      createdAt: now,
      expiresAt: new Date(now.getTime() + RESET_LIFETIME_MS),
    })
    .run();
  void deps.mail.send({
    to: user.email,
    ...templates.passwordReset({ name: user.name, link: appUrl(deps.env, "/reset-password", { token }) }),
  });
}

/**
 * Sets a new password with a reset token: 400 invalid_token for an unknown, used or expired link, 400
 * weak_password for a password too easy to guess. Every outstanding link of the account stops working and every
 * session of the account ends.
 */
export async function resetPassword(db: Db, token: string, password: string): Promise<void> {
  const invalid = () =>
    new HttpError(400, "invalid_token", "This reset link is not valid any more. Ask for a new one.");
  const found = db
    .select()
    .from(passwordResets)
    .where(
      and(
        eq(passwordResets.tokenHash, hashToken(token)),
        isNull(passwordResets.usedAt),
        gt(passwordResets.expiresAt, new Date()),
      ),
    )
    .get();
  if (!found) throw invalid();
  const owner = db
    .select({ email: users.email, name: users.name })
    .from(users)
    .where(eq(users.id, found.userId))
    .get();
  const problem = passwordProblem(password, owner ? [owner.email, owner.name] : []);
  if (problem) throw weakPassword(problem);
  const passwordHash = await hashPassword(password);
  db.transaction((tx) => {
    const now = new Date();
    const claimed = tx
      .update(passwordResets)
      .set({ usedAt: now })
      .where(
        and(
          eq(passwordResets.id, found.id),
          isNull(passwordResets.usedAt),
          gt(passwordResets.expiresAt, now),
        ),
      )
      .run();
    if (claimed.changes !== 1) throw invalid();
    // Other outstanding links of the account stop working too.
    tx.update(passwordResets)
      .set({ usedAt: now })
      .where(and(eq(passwordResets.userId, found.userId), isNull(passwordResets.usedAt)))
      .run();
    tx.update(users).set({ passwordHash }).where(eq(users.id, found.userId)).run();
    tx.delete(sessions).where(eq(sessions.userId, found.userId)).run();
    const user = tx.select({ name: users.name }).from(users).where(eq(users.id, found.userId)).get();
    const spaces = tx
      .select({ workspaceId: memberships.workspaceId })
      .from(memberships)
      .where(eq(memberships.userId, found.userId))
      .all();
    for (const { workspaceId } of spaces) {
      recordAudit(tx, {
        workspaceId,
        actorId: found.userId,
        action: "user.password_reset",
        subjectType: "user",
        subjectId: found.userId,
        summary: `${user?.name ?? "A member"} reset their password with an e-mailed link.`,
      });
    }
  });
}
