// Rate limits. Sign-in failures use express-rate-limit (in memory, one process), keyed on what the server can
// vouch for: the account and the socket address (req.ip, which honours X-Forwarded-For only when TRUST_PROXY is
// configured). The silent per-account reset-mail counter stays hand-written: it must not answer 429, which would
// tell an attacker that the account exists.
import type { Request } from "express";
import { ipKeyGenerator, rateLimit, type RateLimitRequestHandler } from "express-rate-limit";
import { HttpError } from "./errors.ts";

/** The client address a limit is keyed on: req.ip (IPv6 grouped by /56, express-rate-limit's default). */
export function clientAddress(req: Request): string {
  return ipKeyGenerator(req.ip ?? req.socket.remoteAddress ?? "unknown");
}

function waitText(seconds: number): string {
  const minutes = Math.ceil(seconds / 60);
  return minutes <= 1 ? "about a minute" : `${minutes} minutes`;
}

export interface FailureLimitOptions {
  /** Failed requests allowed per key within the window; the next one answers 429. */
  limit: number;
  windowMs: number;
  key: (req: Request) => string;
  /** The 429 message, given the wait in plain English ("15 minutes"). */
  message: (wait: string) => string;
  code?: string;
}

/**
 * Counts failed requests (status ≥ 400) per key; once `limit` failures are counted within the window, the next
 * request answers 429 with Retry-After (seconds) through the error handler, whatever it carries.
 */
export function failureLimit(opts: FailureLimitOptions): RateLimitRequestHandler {
  return rateLimit({
    windowMs: opts.windowMs,
    limit: opts.limit,
    skipSuccessfulRequests: true,
    standardHeaders: false,
    legacyHeaders: false,
    keyGenerator: (req) => opts.key(req),
    // X-Forwarded-For without a trusted proxy is expected here (it is simply ignored), not a misconfiguration.
    validate: { xForwardedForHeader: false, keyGeneratorIpFallback: false },
    handler: (req, res, next) => {
      const info = (req as Request & { rateLimit?: { resetTime?: Date } }).rateLimit;
      const wait = Math.max(
        1,
        Math.ceil(((info?.resetTime?.getTime() ?? Date.now() + opts.windowMs) - Date.now()) / 1000),
      );
      res.set("Retry-After", String(wait));
      next(
        new HttpError(429, opts.code ?? "too_many_attempts", opts.message(waitText(wait)), {
          retryAfterSeconds: wait,
        }),
      );
    },
  });
}

export interface FailureLimiter {
  /** Seconds until another attempt is allowed for `key`, or 0 when allowed now. */
  retryAfter(key: string, now?: number): number;
  /** Records a failed attempt. */
  fail(key: string, now?: number): void;
  /** Forgets the failures of `key` (after a success). */
  reset(key: string): void;
}

/** Sliding-window counter for limits that must stay silent (no 429), such as reset mails per account. */
export function createFailureLimiter(opts: { max: number; windowMs: number }): FailureLimiter {
  const failures = new Map<string, number[]>();

  function recent(key: string, now: number): number[] {
    const list = (failures.get(key) ?? []).filter((t) => t > now - opts.windowMs);
    if (list.length === 0) failures.delete(key);
    else failures.set(key, list);
    return list;
  }

  function sweep(now: number) {
    if (failures.size < 10_000) return;
    for (const key of failures.keys()) recent(key, now);
  }

  return {
    retryAfter(key, now = Date.now()) {
      const list = recent(key, now);
      if (list.length < opts.max) return 0;
      const oldestThatCounts = list[list.length - opts.max] ?? now;
      return Math.max(1, Math.ceil((oldestThatCounts + opts.windowMs - now) / 1000));
    },
    fail(key, now = Date.now()) {
      sweep(now);
      const list = recent(key, now);
      list.push(now);
      failures.set(key, list);
    },
    reset(key) {
      failures.delete(key);
    },
  };
}
