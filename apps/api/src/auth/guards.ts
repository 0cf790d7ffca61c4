// Route guards. Authorization is decided on the server for every route.
import type { Request, RequestHandler } from "express";
import type { Role } from "../db/schema.ts";
import { forbidden, unauthorized } from "../lib/errors.ts";
import type { AuthContext } from "./types.ts";

/** 401 unless a valid session is attached to the request. */
export const requireAuth: RequestHandler = (req, _res, next) => {
  next(req.auth ? undefined : unauthorized());
};

/** 401 without a session, 403 unless the member holds at least one of `roles`. */
export function requireRole(...roles: Role[]): RequestHandler {
  return (req, _res, next) => {
    if (!req.auth) return next(unauthorized());
    if (!req.auth.roles.some((r) => roles.includes(r))) {
      return next(forbidden(`This needs the ${roles.join(" or ")} role.`));
    }
    next();
  };
}

/** The signed-in member of a request that passed requireAuth/requireRole. */
export function getAuth(req: Request): AuthContext {
  if (!req.auth) throw unauthorized();
  return req.auth;
}
