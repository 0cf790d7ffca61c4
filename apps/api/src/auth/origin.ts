// Cross-site request forgery defence: a mutation that carries the session cookie, or any Origin at all, must come
// from the server's own origin (its Host header) or from PUBLIC_URL's origin. Otherwise 403 bad_origin.
import type { Request, RequestHandler } from "express";
import type { AppContext } from "../context.ts";
import { HttpError } from "../lib/errors.ts";
import { SESSION_COOKIE } from "./lucia.ts";

const SAFE = new Set(["GET", "HEAD", "OPTIONS"]);

function originOf(value: string | undefined): string | null {
  if (!value || value === "null") return null;
  try {
    return new URL(value).origin;
  } catch {
    return null;
  }
}

function hasSessionCookie(req: Request): boolean {
  const header = req.headers.cookie;
  if (!header) return false;
  return header.split(";").some((part) => part.trim().startsWith(`${SESSION_COOKIE}=`));
}

/** The origins a request may come from: the one it was addressed to, and PUBLIC_URL's. */
export function allowedOrigins(ctx: AppContext, req: Request): string[] {
  const out: string[] = [];
  const host = req.get("host");
  if (host) {
    const own = originOf(`${req.protocol}://${host}`);
    if (own) out.push(own);
  }
  const pub = originOf(ctx.env.PUBLIC_URL);
  if (pub) out.push(pub);
  return out;
}

export function originCheck(ctx: AppContext): RequestHandler {
  return (req, _res, next) => {
    if (SAFE.has(req.method)) return next();
    const originHeader = req.get("origin");
    const claimed = originHeader !== undefined ? originOf(originHeader) : originOf(req.get("referer"));
    const stated = originHeader !== undefined || req.get("referer") !== undefined;
    if (!stated && !hasSessionCookie(req)) return next();
    if (claimed && allowedOrigins(ctx, req).includes(claimed)) return next();
    next(
      new HttpError(
        403,
        "bad_origin",
        claimed
          ? `Requests from ${claimed} are not accepted; use Stackproof from its own address.`
          : "This request needs an Origin header from Stackproof's own address.",
      ),
    );
  };
}
