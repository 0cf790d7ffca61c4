// Builds the Express application; src/index.ts only listens.
import fs from "node:fs";
import path from "node:path";
import express, { type Express } from "express";
import helmet from "helmet";
import type { AppContext } from "./context.ts";
import { errorHandler, notFoundHandler } from "./lib/errors.ts";
import { healthRoutes } from "./routes/health.ts";
import { accessRoutes } from "./routes/access/index.ts";
import { domainRoutes } from "./routes/domain/index.ts";
import { sessionMiddleware } from "./auth/session.ts";
import { originCheck } from "./auth/origin.ts";

export type { AppContext } from "./context.ts";
export { createContext } from "./context.ts";
export { loadEnv } from "./env.ts";

export function createApp(ctx: AppContext): Express {
  const app = express();
  app.disable("x-powered-by");
  // X-Forwarded-For counts only behind a configured proxy; otherwise req.ip is the socket address.
  app.set("trust proxy", ctx.env.TRUST_PROXY);
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          "script-src": ["'self'"],
          "worker-src": ["'self'", "blob:"],
          "img-src": ["'self'", "data:", "blob:"],
          "style-src": ["'self'", "'unsafe-inline'"],
          "upgrade-insecure-requests": null,
        },
      },
      hsts: ctx.env.NODE_ENV === "production" && ctx.env.PUBLIC_URL?.startsWith("https:") ? undefined : false,
    }),
  );
  app.use(express.json({ limit: "2mb" }));

  const api = express.Router();
  api.use(originCheck(ctx));
  api.use(sessionMiddleware(ctx));
  api.use(healthRoutes(ctx));
  api.use("/v1", accessRoutes(ctx));
  api.use("/v1", domainRoutes(ctx));
  api.use(notFoundHandler);
  app.use("/api", api);

  const index = path.join(ctx.env.WEB_DIST, "index.html");
  if (ctx.env.NODE_ENV === "production" && fs.existsSync(index)) {
    app.use(express.static(ctx.env.WEB_DIST, { index: false, maxAge: "1h" }));
    // Client-side routes: every other GET gets the app shell.
    app.get(/^(?!\/api\/).*/, (_req, res) => res.sendFile(index));
  }
  app.use(notFoundHandler);
  app.use(errorHandler);
  return app;
}
