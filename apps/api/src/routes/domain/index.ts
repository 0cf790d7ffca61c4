// Programs, designs, revisions, materials, uploads, yield runs, threads, approvals, release records.
import { Router } from "express";
import type { AppContext } from "../../context.ts";
import { designRoutes } from "./designs.ts";
import { lotRoutes } from "./lots.ts";
import { materialRoutes } from "./materials.ts";
import { programRoutes } from "./programs.ts";
import { threadRoutes } from "./threads.ts";
import { workflowRoutes } from "./workflow.ts";
import { yieldRoutes } from "./yield.ts";

export function domainRoutes(ctx: AppContext): Router {
  const router = Router();
  programRoutes(ctx, router);
  designRoutes(ctx, router);
  materialRoutes(ctx, router);
  yieldRoutes(ctx, router);
  threadRoutes(ctx, router);
  workflowRoutes(ctx, router);
  lotRoutes(ctx, router);
  return router;
}
