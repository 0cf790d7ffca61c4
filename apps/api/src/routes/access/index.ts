// Sign-in, people, roles, invitations, mail outbox, audit.
import { Router } from "express";
import type { AppContext } from "../../context.ts";
import { authRoutes } from "./auth.ts";
import { invitationRoutes } from "./invitations.ts";
import { memberRoutes } from "./members.ts";
import { auditRoutes } from "./audit.ts";
import { outboxRoutes } from "./outbox.ts";

export function accessRoutes(ctx: AppContext): Router {
  const router = Router();
  authRoutes(ctx, router);
  invitationRoutes(ctx, router);
  memberRoutes(ctx, router);
  auditRoutes(ctx, router);
  outboxRoutes(ctx, router);
  return router;
}
