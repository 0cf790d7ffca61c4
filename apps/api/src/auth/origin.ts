// Cross-site request forgery defence: a mutation that carries the session cookie, or any Origin at all, must come
// from a configured origin (PUBLIC_URL, ALLOWED_ORIGINS, else the address the server listens on). Otherwise 403
// bad_origin. The Host header is never trusted: a DNS-rebinding page controls it.
import type { Request, RequestHandler } from "express";
import type { AppContext } from "../context.ts";
import type { Env } from "../env.ts";
import { appOrigin } from "../mail/links.ts";
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

const LOOPBACK = new Set(["127.0.0.1", "localhost", "::1", "[::1]", "0.0.0.0", "::"]);

/**
 * The origins mutations may come from, from configuration only: PUBLIC_URL and ALLOWED_ORIGINS; without PUBLIC_URL,
 * the address the server listens on (both loopback spellings when it listens on loopback); in development also the
 * Vite dev server on :5173.
 */
export function allowedOrigins(env: Env): string[] {
  const out = new Set<string>(env.ALLOWED_ORIGINS);
  const pub = originOf(env.PUBLIC_URL);
  if (pub) out.add(pub);
  else {
    out.add(appOrigin(env));
    if (LOOPBACK.has(env.HOST)) {
      out.add(`http://127.0.0.1:${env.PORT}`);
      out.add(`http://localhost:${env.PORT}`);
    }
  }
  if (env.NODE_ENV === "development") {
    out.add("http://localhost:5173");
    out.add("http://127.0.0.1:5173");
  }
  return [...out];
}

export function originCheck(ctx: AppContext): RequestHandler {
  const allowed = new Set(allowedOrigins(ctx.env));
  return (req, _res, next) => {
    if (SAFE.has(req.method)) return next();
    const originHeader = req.get("origin");
    const claimed = originHeader !== undefined ? originOf(originHeader) : originOf(req.get("referer"));
    const stated = originHeader !== undefined || req.get("referer") !== undefined;
    if (!stated && !hasSessionCookie(req)) return next();
    if (claimed && allowed.has(claimed)) return next();
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
