// Sign-in, people, roles, invitations, mail outbox, audit.
import { Router } from "express";
import type { AppContext } from "../../context.ts";

export function accessRoutes(_ctx: AppContext): Router {
  return Router();
}
