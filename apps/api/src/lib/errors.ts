// One error shape for every response: { error: { code, message, details? } }.
import type { ErrorRequestHandler, RequestHandler } from "express";
import { ZodError } from "zod";

export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
  }
}

export const badRequest = (message: string, details?: unknown) =>
  new HttpError(400, "bad_request", message, details);
export const unauthorized = (message = "Sign in to continue.") => new HttpError(401, "unauthorized", message);
export const forbidden = (message = "Your role does not allow this.") => new HttpError(403, "forbidden", message);
export const notFound = (what = "Resource") => new HttpError(404, "not_found", `${what} not found.`);
export const conflict = (message: string, details?: unknown) => new HttpError(409, "conflict", message, details);
export const unprocessable = (message: string, details?: unknown) =>
  new HttpError(422, "unprocessable", message, details);

export function zodDetails(err: ZodError) {
  return err.issues.map((i) => ({ path: i.path.join("."), message: i.message }));
}

export const notFoundHandler: RequestHandler = (req, _res, next) => {
  next(new HttpError(404, "not_found", `No route for ${req.method} ${req.path}.`));
};

interface BodyParserError extends Error {
  type?: string;
  status?: number;
}

export const errorHandler: ErrorRequestHandler = (err: unknown, req, res, _next) => {
  if (err instanceof HttpError) {
    res.status(err.status).json({ error: { code: err.code, message: err.message, details: err.details } });
    return;
  }
  if (err instanceof ZodError) {
    const details = zodDetails(err);
    const first = details[0];
    res.status(400).json({
      error: {
        code: "validation_failed",
        message: first ? `${first.path || "input"}: ${first.message}` : "Invalid input.",
        details,
      },
    });
    return;
  }
  if (err instanceof RangeError) {
    res.status(400).json({ error: { code: "invalid_value", message: err.message } });
    return;
  }
  const e = err as BodyParserError;
  if (e?.type === "entity.parse.failed") {
    res.status(400).json({ error: { code: "malformed_json", message: "The request body is not valid JSON." } });
    return;
  }
  if (e?.type === "entity.too.large") {
    res.status(413).json({ error: { code: "payload_too_large", message: "The request body is too large." } });
    return;
  }
  // With its stack at error level on the request's logger (pino-http), which carries the request id.
  const log = (req as { log?: { error(obj: object, msg: string): void } }).log;
  if (log) log.error({ err }, "unhandled error");
  else console.error(err);
  res.status(500).json({ error: { code: "internal", message: "Something went wrong on the server." } });
};
