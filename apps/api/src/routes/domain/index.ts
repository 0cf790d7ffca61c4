// Programs, designs, revisions, materials, uploads, yield runs, threads, approvals, release records.
import { Router } from "express";
import type { AppContext } from "../../context.ts";

export function domainRoutes(_ctx: AppContext): Router {
  return Router();
}
