// Reads the session cookie and attaches req.auth. Placeholder until sign-in lands.
import type { RequestHandler } from "express";
import type { AppContext } from "../context.ts";
import "./types.ts";

export function sessionMiddleware(_ctx: AppContext): RequestHandler {
  return (_req, _res, next) => next();
}
