// Sign-in, sign-out, the current member, and password reset by e-mail.
import type { Router } from "express";
import { and, asc, eq, gt, isNull } from "drizzle-orm";
import { z } from "zod";
import type { AppContext } from "../../context.ts";
import { memberships, passwordResets, sessions, users, workspaces } from "../../db/schema.ts";
import { getAuth } from "../../auth/guards.ts";
import { luciaFor } from "../../auth/lucia.ts";
import { hashPassword, normalizeEmail, verifyAgainstDummy, verifyPassword } from "../../auth/password.ts";
import { hashToken, newId, newToken } from "../../auth/tokens.ts";
import { recordAudit } from "../../lib/audit.ts";
import { HttpError } from "../../lib/errors.ts";
import { route } from "../../lib/route.ts";
import { createFailureLimiter } from "../../lib/rate-limit.ts";
import { appUrl } from "../../mail/links.ts";
import { templates } from "../../mail/templates.ts";
import { startSession } from "./session-cookie.ts";
import { EmailInput, NewPassword, SessionInfo, TokenInput } from "@stackproof/contracts";

/** Sign-in: 5 failures per e-mail and address, or 50 per address, within 15 minutes. */
export const SIGN_IN_LIMIT = { perAccount: 5, perAddress: 50, windowMs: 15 * 60_000 };
/** A reset link works for one hour. */
export const RESET_LIFETIME_MS = 60 * 60_000;
/** At most 5 reset e-mails per account per hour. */
const RESET_MAILS_PER_HOUR = 5;

function waitText(seconds: number): string {
  const minutes = Math.ceil(seconds / 60);
  return minutes <= 1 ? "about a minute" : `${minutes} minutes`;
}

export function authRoutes(ctx: AppContext, router: Router): void {
  const lucia = luciaFor(ctx.db, ctx.env);
  const perAccount = createFailureLimiter({ max: SIGN_IN_LIMIT.perAccount, windowMs: SIGN_IN_LIMIT.windowMs });
  const perAddress = createFailureLimiter({ max: SIGN_IN_LIMIT.perAddress, windowMs: SIGN_IN_LIMIT.windowMs });
  const resetMails = createFailureLimiter({ max: RESET_MAILS_PER_HOUR, windowMs: 60 * 60_000 });
  let lastSweep = 0;
  /** Expired sessions are deleted when met; this removes the ones never seen again, at most hourly. */
  async function sweepExpiredSessions() {
    if (Date.now() - lastSweep < 60 * 60_000) return;
    lastSweep = Date.now();
    await lucia.deleteExpiredSessions();
  }

  route(
    router,
    {
      method: "post",
      path: "/auth/sign-in",
      summary: "Sign in with e-mail and password; sets the session cookie",
      tag: "access",
      access: "public",
      body: z.object({ email: EmailInput, password: z.string().min(1, "Enter your password.").max(1000) }),
      response: SessionInfo,
      errors: {
        401: "Wrong e-mail or password (invalid_credentials)",
        403: "The account belongs to no workspace (no_membership)",
        429: "Too many failed attempts (too_many_attempts); see Retry-After",
      },
    },
    async ({ body, req, res }) => {
      const address = req.ip ?? "unknown";
      const accountKey = `${body.email}|${address}`;
      const wait = Math.max(perAccount.retryAfter(accountKey), perAddress.retryAfter(address));
      if (wait > 0) {
        res.set("Retry-After", String(wait));
        throw new HttpError(
          429,
          "too_many_attempts",
          `Too many failed sign-in attempts. Wait ${waitText(wait)} and try again, or reset your password.`,
          { retryAfterSeconds: wait },
        );
      }
      const user = ctx.db.select().from(users).where(eq(users.email, body.email)).get();
      const ok = user ? await verifyPassword(user.passwordHash, body.password) : await verifyAgainstDummy(body.password);
      if (!user || !ok) {
        perAccount.fail(accountKey);
        perAddress.fail(address);
        throw new HttpError(401, "invalid_credentials", "That e-mail address and password do not match an account.");
      }
      const membership = ctx.db
        .select({ roles: memberships.roles, id: workspaces.id, name: workspaces.name })
        .from(memberships)
        .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
        .where(eq(memberships.userId, user.id))
        .orderBy(asc(memberships.createdAt))
        .get();
      if (!membership) {
        throw new HttpError(403, "no_membership", "This account is not a member of any workspace. Ask an admin to invite you.");
      }
      perAccount.reset(accountKey);
      if (req.auth) await lucia.invalidateSession(req.auth.sessionId);
      await sweepExpiredSessions();
      return startSession(ctx, res, user, { id: membership.id, name: membership.name }, membership.roles);
    },
  );

  route(
    router,
    { method: "post", path: "/auth/sign-out", summary: "End the current session", tag: "access", access: "member", status: 204 },
    async ({ req, res }) => {
      await lucia.invalidateSession(getAuth(req).sessionId);
      res.append("Set-Cookie", lucia.createBlankSessionCookie().serialize());
      return undefined;
    },
  );

  route(
    router,
    { method: "get", path: "/auth/me", summary: "The signed-in member, workspace and roles", tag: "access", access: "member", response: SessionInfo },
    ({ req }) => {
      const auth = getAuth(req);
      return { user: auth.user, workspace: { id: auth.workspaceId, name: auth.workspaceName }, roles: auth.roles };
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/auth/password-reset",
      summary: "Mail a single-use password reset link (answers 202 whether or not the account exists)",
      tag: "access",
      access: "public",
      status: 202,
      body: z.object({ email: EmailInput }),
    },
    ({ body }) => {
      const email = normalizeEmail(body.email);
      const user = ctx.db.select().from(users).where(eq(users.email, email)).get();
      if (!user || resetMails.retryAfter(user.id) > 0) return undefined;
      resetMails.fail(user.id);
      const { token, hash } = newToken();
      const now = new Date();
      ctx.db
        .insert(passwordResets)
        .values({ id: newId(), userId: user.id, tokenHash: hash, createdAt: now, expiresAt: new Date(now.getTime() + RESET_LIFETIME_MS) })
        .run();
      // Not awaited: the answer must not take longer when the account exists.
      void ctx.mail.send({
        to: user.email,
        ...templates.passwordReset({ name: user.name, link: appUrl(ctx.env, "/reset-password", { token }) }),
      });
      return undefined;
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/auth/password-reset/confirm",
      summary: "Set a new password with a reset token; ends every session of the account",
      tag: "access",
      access: "public",
      status: 204,
      body: z.object({ token: TokenInput, password: NewPassword }),
      errors: { 400: "Invalid input, or the link is unknown, used or expired (invalid_token)" },
    },
    async ({ body }) => {
      const invalid = () =>
        new HttpError(400, "invalid_token", "This reset link is not valid any more. Ask for a new one.");
      const tokenHash = hashToken(body.token);
      const found = ctx.db
        .select()
        .from(passwordResets)
        .where(and(eq(passwordResets.tokenHash, tokenHash), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, new Date())))
        .get();
      if (!found) throw invalid();
      const passwordHash = await hashPassword(body.password);
      ctx.db.transaction((tx) => {
        const now = new Date();
        const claimed = tx
          .update(passwordResets)
          .set({ usedAt: now })
          .where(and(eq(passwordResets.id, found.id), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, now)))
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
        const spaces = tx.select({ workspaceId: memberships.workspaceId }).from(memberships).where(eq(memberships.userId, found.userId)).all();
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
      return undefined;
    },
  );
}
