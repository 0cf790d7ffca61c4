// Sign-in, people, roles, invitations, mail outbox, audit.
import { Router } from "express";
import type { AppContext } from "../../context.ts";
import { authRoutes } from "./auth.ts";

export function accessRoutes(ctx: AppContext): Router {
  const router = Router();
  authRoutes(ctx, router);
  return router;
}
