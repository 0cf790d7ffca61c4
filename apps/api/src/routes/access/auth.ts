// Sign-in, sign-out, the current member, and password reset by e-mail. The accounts domain (domain/accounts.ts)
// does the work; this file keeps the HTTP part: rate limits, cookies, status codes.
import type { Request, Router } from "express";
import type { AppContext } from "../../context.ts";
import { getAuth } from "../../auth/guards.ts";
import { normalizeEmail } from "../../auth/password.ts";
import { route } from "../../lib/route.ts";
import { clientAddress, createFailureLimiter, failureLimit } from "../../lib/rate-limit.ts";
import {
  checkCredentials,
  deleteExpiredSessions,
  endSession,
  requestPasswordReset,
  resetPassword,
  sessionInfo,
  startSession,
} from "../../domain/accounts.ts";
import { PasswordResetBody, PasswordResetConfirmBody, SessionInfo, SignInBody } from "@stackproof/contracts";

/** Sign-in: 5 failures per e-mail and address, or 50 per address, within 15 minutes. */
export const SIGN_IN_LIMIT = { perAccount: 5, perAddress: 50, windowMs: 15 * 60_000 };
/** At most 5 reset e-mails per account per hour. */
const RESET_MAILS_PER_HOUR = 5;

const accountKey = (req: Request) => {
  const email = typeof req.body?.email === "string" ? normalizeEmail(req.body.email) : "";
  return `${email}|${clientAddress(req)}`;
};

const signInWait = (wait: string) =>
  `Too many failed sign-in attempts. Wait ${wait} and try again, or reset your password.`;

export function authRoutes(ctx: AppContext, router: Router): void {
  const { db, env } = ctx;
  const mailDeps = { db, mail: ctx.mail, env };
  const perAccount = failureLimit({
    limit: SIGN_IN_LIMIT.perAccount,
    windowMs: SIGN_IN_LIMIT.windowMs,
    key: accountKey,
    message: signInWait,
  });
  const perAddress = failureLimit({
    limit: SIGN_IN_LIMIT.perAddress,
    windowMs: SIGN_IN_LIMIT.windowMs,
    key: clientAddress,
    message: signInWait,
  });
  const resetMails = createFailureLimiter({ max: RESET_MAILS_PER_HOUR, windowMs: 60 * 60_000 });
  let lastSweep = 0;
  /** Expired sessions are deleted when met; this removes the ones never seen again, at most hourly. */
  async function sweepExpiredSessions() {
    if (Date.now() - lastSweep < 60 * 60_000) return;
    lastSweep = Date.now();
    await deleteExpiredSessions(db, env);
  }

  route(
    router,
    {
      method: "post",
      path: "/auth/sign-in",
      summary: "Sign in with e-mail and password; sets the session cookie",
      tag: "access",
      access: "public",
      body: SignInBody,
      response: SessionInfo,
      before: [perAccount, perAddress],
      errors: {
        401: "Wrong e-mail or password (invalid_credentials)",
        403: "The account belongs to no workspace (no_membership)",
        429: "Too many failed attempts (too_many_attempts); see Retry-After",
      },
    },
    async ({ body, req, res }) => {
      const member = await checkCredentials(db, body.email, body.password);
      await perAccount.resetKey(accountKey(req));
      await sweepExpiredSessions();
      const { cookie, info } = await startSession(db, env, member, req.auth?.sessionId);
      res.append("Set-Cookie", cookie);
      return info;
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/auth/sign-out",
      summary: "End the current session",
      tag: "access",
      access: "member",
      status: 204,
    },
    async ({ req, res }) => {
      res.append("Set-Cookie", await endSession(db, env, getAuth(req).sessionId));
      return undefined;
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/auth/me",
      summary: "The signed-in member, workspace and roles",
      tag: "access",
      access: "member",
      response: SessionInfo,
    },
    ({ req }) => {
      const auth = getAuth(req);
      return sessionInfo(db, {
        user: auth.user,
        workspace: { id: auth.workspaceId, name: auth.workspaceName },
        roles: auth.roles,
      });
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
      body: PasswordResetBody,
    },
    ({ body }) => {
      requestPasswordReset(mailDeps, body.email, (userId) => {
        if (resetMails.retryAfter(userId) > 0) return false;
        resetMails.fail(userId);
        return true;
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
      body: PasswordResetConfirmBody,
      errors: {
        400: "Invalid input, a password shorter than 12 characters or too easy to guess (weak_password), or the link is unknown, used or expired (invalid_token)",
      },
    },
    async ({ body }) => {
      await resetPassword(db, body.token, body.password);
      return undefined;
    },
  );
}
