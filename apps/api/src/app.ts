// Builds the Express application; src/index.ts only listens.
import fs from "node:fs";
import path from "node:path";
import compression from "compression";
import express, { type Express } from "express";
import helmet from "helmet";
import type { AppContext } from "./context.ts";
import { errorHandler, notFoundHandler } from "./lib/errors.ts";
import { healthRoutes } from "./routes/health.ts";
import { accessRoutes } from "./routes/access/index.ts";
import { domainRoutes } from "./routes/domain/index.ts";
import { sessionMiddleware } from "./auth/session.ts";
import { originCheck } from "./auth/origin.ts";
import { requestLogger } from "./lib/log.ts";

export type { AppContext } from "./context.ts";
export { createContext } from "./context.ts";
export { loadEnv } from "./env.ts";

export function createApp(ctx: AppContext): Express {
  const app = express();
  app.disable("x-powered-by");
  // X-Forwarded-For counts only behind a configured proxy; otherwise req.ip is the socket address.
  app.set("trust proxy", ctx.env.TRUST_PROXY);
  app.use(requestLogger(ctx.log));
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
    // gzip or brotli, whichever the browser prefers (compression 1.8 speaks both); API responses stay uncompressed.
    const compress = compression({ threshold: 1024 });
    // Source maps are never served (the build keeps none public; a stray .map file still answers 404).
    app.use((req, _res, next) => (req.path.endsWith(".map") ? notFoundHandler(req, _res, next) : next()));
    // Vite's hashed files: a new build has new names, so they may be cached for good.
    app.use(
      "/assets",
      compress,
      express.static(path.join(ctx.env.WEB_DIST, "assets"), {
        index: false,
        immutable: true,
        maxAge: "365d",
      }),
    );
    app.use("/assets", notFoundHandler);
    app.use(
      compress,
      express.static(ctx.env.WEB_DIST, {
        index: false,
        setHeaders: (res) => res.setHeader("Cache-Control", "no-cache"),
      }),
    );
    // Client-side routes: every other GET gets the app shell, revalidated on every visit.
    app.get(/^(?!\/api\/).*/, compress, (_req, res) => {
      res.setHeader("Cache-Control", "no-cache");
      res.sendFile(index);
    });
  }
  app.use(notFoundHandler);
  app.use(errorHandler);
  return app;
}
