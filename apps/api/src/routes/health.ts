import { Router } from "express";
import { ENGINE_VERSION } from "@stackproof/optics";
import type { AppContext } from "../context.ts";
import { migrationStatus } from "../db/client.ts";
import { API_VERSION } from "../version.ts";
import { buildOpenApiDocument } from "../lib/openapi.ts";

export function healthRoutes(ctx: AppContext): Router {
  const router = Router();
  router.get("/health", (_req, res) => {
    let database: "ok" | "error" = "ok";
    let migrations = { applied: 0, available: 0, upToDate: false };
    try {
      ctx.db.$client.prepare("SELECT 1").get();
      migrations = migrationStatus(ctx.db);
    } catch {
      database = "error";
    }
    const ok = database === "ok" && migrations.upToDate;
    res.status(ok ? 200 : 503).json({
      status: ok ? "ok" : "degraded",
      version: API_VERSION,
      engineVersion: ENGINE_VERSION,
      database,
      migrations,
    });
  });
  router.get("/v1/openapi.json", (_req, res) => {
    res.json(buildOpenApiDocument());
  });
  return router;
}
