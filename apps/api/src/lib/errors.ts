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

/** Errors raised by body-parser, raw-body and the router (http-errors): they carry a status and often a type. */
interface ClientError extends Error {
  type?: string;
  status?: number;
  statusCode?: number;
  expose?: boolean;
}

/** Plain-English answers for the request errors Express's parsers raise, by their `type`. */
const CLIENT_ERRORS: Record<string, { code: string; message: string }> = {
  "entity.parse.failed": { code: "malformed_json", message: "The request body is not valid JSON." },
  "entity.too.large": { code: "payload_too_large", message: "The request body is too large." },
  "charset.unsupported": {
    code: "unsupported_charset",
    message: "The request body's charset is not supported; send JSON as UTF-8 (Content-Type: application/json).",
  },
  "encoding.unsupported": {
    code: "unsupported_content_encoding",
    message: "The request's Content-Encoding is not supported; send identity, gzip, deflate or br.",
  },
  "request.aborted": { code: "request_aborted", message: "The request body ended early." },
  "request.size.invalid": { code: "bad_content_length", message: "The request body does not match its Content-Length." },
  "parameters.too.many": { code: "payload_too_large", message: "The request has too many parameters." },
};

/** A 4xx status carried by a parser or router error (http-errors style), or null. */
function clientStatus(e: ClientError): number | null {
  const status = e.status ?? e.statusCode;
  return typeof status === "number" && Number.isInteger(status) && status >= 400 && status < 500 ? status : null;
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
  if (err instanceof URIError) {
    // A path such as /api/v1/designs/%ff%fe that does not decode as UTF-8.
    res.status(400).json({ error: { code: "malformed_uri", message: "The request path is not valid percent-encoded UTF-8." } });
    return;
  }
  const e = (err ?? {}) as ClientError;
  const status = clientStatus(e);
  if (status !== null) {
    const known = e.type ? CLIENT_ERRORS[e.type] : undefined;
    // A gzip/deflate body that does not inflate fails with a zlib error and status 400.
    const message = known?.message ?? (e.expose && e.message ? `The request could not be read: ${e.message}.` : "The request could not be read.");
    res.status(status).json({ error: { code: known?.code ?? "bad_request", message } });
    return;
  }
  // With its stack at error level on the request's logger (pino-http), which carries the request id.
  const log = (req as { log?: { error(obj: object, msg: string): void } }).log;
  if (log) log.error({ err }, "unhandled error");
  else console.error(err);
  res.status(500).json({ error: { code: "internal", message: "Something went wrong on the server." } });
};
