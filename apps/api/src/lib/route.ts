// Declares a route once: zod validation of params, query and body, the role guard, and its OpenAPI entry.
import type { Request, RequestHandler, Response, Router } from "express";
import type { z } from "zod";
import type { Role } from "../db/schema.ts";
import { requireAuth, requireRole } from "../auth/guards.ts";
import { HttpError, zodDetails } from "./errors.ts";

export type Method = "get" | "post" | "put" | "patch" | "delete";

/** Who may call a route: anyone, any signed-in member, or members holding one of the roles. */
export type Access = "public" | "member" | readonly Role[];

export interface RouteSpec<P extends z.ZodType, Q extends z.ZodType, B extends z.ZodType> {
  method: Method;
  /** Express-style path relative to /api/v1, e.g. "/programs/:id". */
  path: string;
  summary: string;
  tag: string;
  access: Access;
  params?: P;
  query?: Q;
  body?: B;
  /** Shape of a successful JSON response, for the OpenAPI document. */
  response?: z.ZodType;
  /** Status of a successful response (default 200). */
  status?: number;
  /** Request is multipart/form-data (the body schema then describes the text fields). */
  multipart?: boolean;
  /** Middleware to run after the guard and before validation (e.g. multer). */
  before?: RequestHandler[];
  /** Non-success statuses this route documents, with a reason. */
  errors?: Record<number, string>;
}

export interface Input<P, Q, B> {
  params: P;
  query: Q;
  body: B;
  req: Request;
  res: Response;
}

export interface RegisteredRoute {
  method: Method;
  path: string;
  summary: string;
  tag: string;
  access: Access;
  status: number;
  multipart: boolean;
  params?: z.ZodType;
  query?: z.ZodType;
  body?: z.ZodType;
  response?: z.ZodType;
  errors: Record<number, string>;
}

/** Every route declared through `route()`, keyed by "METHOD path"; read by the OpenAPI generator and the role matrix test. */
export const routeRegistry = new Map<string, RegisteredRoute>();

function parse<T extends z.ZodType>(schema: T | undefined, value: unknown, where: string): z.infer<T> {
  if (!schema) return value as z.infer<T>;
  const result = schema.safeParse(value);
  if (!result.success) {
    const details = zodDetails(result.error);
    const first = details[0];
    throw new HttpError(
      400,
      "validation_failed",
      first ? `${where}${first.path ? "." + first.path : ""}: ${first.message}` : `Invalid ${where}.`,
      details,
    );
  }
  return result.data;
}

/**
 * Adds a route to `router`. The handler returns the response body (sent as JSON with `spec.status`),
 * or sends the response itself and returns undefined.
 */
export function route<P extends z.ZodType = z.ZodUnknown, Q extends z.ZodType = z.ZodUnknown, B extends z.ZodType = z.ZodUnknown>(
  router: Router,
  spec: RouteSpec<P, Q, B>,
  handler: (input: Input<z.infer<P>, z.infer<Q>, z.infer<B>>) => unknown,
): void {
  routeRegistry.set(`${spec.method.toUpperCase()} ${spec.path}`, {
    method: spec.method,
    path: spec.path,
    summary: spec.summary,
    tag: spec.tag,
    access: spec.access,
    status: spec.status ?? 200,
    multipart: spec.multipart ?? false,
    params: spec.params,
    query: spec.query,
    body: spec.body,
    response: spec.response,
    errors: spec.errors ?? {},
  });
  const guard = spec.access === "public" ? [] : spec.access === "member" ? [requireAuth] : [requireRole(...spec.access)];
  router[spec.method](spec.path, ...guard, ...(spec.before ?? []), async (req: Request, res: Response) => {
    const params = parse(spec.params, req.params, "params");
    const query = parse(spec.query, req.query, "query");
    const body = parse(spec.body, req.body ?? {}, "body");
    const out = await handler({ params, query, body, req, res });
    if (!res.headersSent) {
      if (out === undefined) res.status(spec.status ?? 204).end();
      else res.status(spec.status ?? 200).json(out);
    }
  });
}
