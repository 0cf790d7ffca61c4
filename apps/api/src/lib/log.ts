// JSON logs (pino): one line per request through pino-http, with a request id taken from and echoed in X-Request-Id.
import { randomUUID } from "node:crypto";
import type { IncomingMessage, ServerResponse } from "node:http";
import { pino, type Logger } from "pino";
import { pinoHttp } from "pino-http";
import { logLevelOf, type Env } from "../env.ts";

export type { Logger } from "pino";

/** The process logger: JSON lines on stdout at LOG_LEVEL. */
export function createLogger(env: Env): Logger {
  return pino({ level: logLevelOf(env), base: { service: "stackproof-api" } });
}

// A caller's id is kept when it looks like an id (no spaces or control characters), else a fresh one is made.
const REQUEST_ID = /^[\w.:@/+=-]{1,128}$/;

/** Express middleware: logs each request once when it ends; req.log carries its id for handlers and errors. */
export function requestLogger(log: Logger) {
  return pinoHttp({
    logger: log,
    genReqId(req: IncomingMessage, res: ServerResponse) {
      const given = req.headers["x-request-id"];
      const id = typeof given === "string" && REQUEST_ID.test(given) ? given : randomUUID();
      res.setHeader("X-Request-Id", id);
      return id;
    },
    customLogLevel(_req, res, err) {
      if (err || res.statusCode >= 500) return "error";
      if (res.statusCode >= 400) return "warn";
      return "info";
    },
    // One short line: what was asked, by which address, and the answer (no headers, so no cookies or credentials).
    serializers: {
      req: (req: { id: unknown; method: string; url: string; remoteAddress?: string }) => ({
        id: req.id,
        method: req.method,
        url: req.url,
        remoteAddress: req.remoteAddress,
      }),
      res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
    },
  });
}
