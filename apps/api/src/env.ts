// The only place that reads process.env: configuration is parsed and validated once.
import { z } from "zod";
import path from "node:path";
import { fileURLToPath } from "node:url";

const apiRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
export const repoRoot = path.resolve(apiRoot, "../..");

const boolish = z.enum(["true", "false", "1", "0"]).transform((v) => v === "true" || v === "1");

const EnvSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  HOST: z.string().default("127.0.0.1"),
  PORT: z.coerce.number().int().min(0).max(65535).default(5317),
  /** Public URL that links in e-mails point at, and an allowed origin. Defaults to http://HOST:PORT. */
  PUBLIC_URL: z.string().url().optional(),
  /** More origins that may send mutations (comma-separated, e.g. "https://a.example,https://b.example"). */
  ALLOWED_ORIGINS: z
    .string()
    .optional()
    .transform((v, c) => {
      const out: string[] = [];
      for (const item of (v ?? "")
        .split(",")
        .map((s) => s.trim())
        .filter(Boolean)) {
        try {
          const origin = new URL(item).origin;
          if (origin === "null") throw new Error("opaque");
          out.push(origin);
        } catch {
          c.addIssue({
            code: "custom",
            message: `"${item}" is not an origin like https://stackproof.example`,
          });
        }
      }
      return out;
    }),
  /**
   * Express "trust proxy": unset = the socket address is the client (X-Forwarded-For ignored). A number of hops,
   * "true", or a comma-separated list of proxy addresses/subnets ("loopback", "10.0.0.0/8").
   */
  TRUST_PROXY: z
    .string()
    .optional()
    .transform((v): boolean | number | string => {
      if (v === undefined || v === "" || v === "false" || v === "0") return false;
      if (v === "true") return true;
      if (/^\d+$/.test(v)) return Number(v);
      return v;
    }),
  DATA_DIR: z.string().default(path.join(repoRoot, "data")),
  /** SQLite file; defaults to DATA_DIR/stackproof.db. */
  DATABASE_FILE: z.string().optional(),
  /** Load the fictional demo workspace when the database is new. Default: on, except in production (off). */
  DEMO_DATA: boolish.optional(),
  /** Built web app served in production. */
  WEB_DIST: z.string().default(path.join(repoRoot, "apps/web/dist")),
  /**
   * Outgoing mail. Without SMTP_HOST a capture server on loopback keeps messages for the outbox page (admins only);
   * in production only when MAIL_CAPTURE=true.
   */
  SMTP_HOST: z.string().optional(),
  SMTP_PORT: z.coerce.number().int().optional(),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  SMTP_SECURE: boolish.optional(),
  /** Keep mail in the local capture (outbox page). Default: on without SMTP_HOST, except in production (off). */
  MAIL_CAPTURE: boolish.optional(),
  MAIL_FROM: z.string().default("Stackproof <no-reply@stackproof.local>"),
  /** Port of the local capture SMTP server (0 = any free port). */
  CAPTURE_SMTP_PORT: z.coerce.number().int().min(0).max(65535).default(0),
  /** Worker threads for verified yield runs; defaults to the number of cores. Older name of EMBEDDED_WORKERS. */
  YIELD_WORKERS: z.coerce.number().int().min(1).max(64).optional(),
  /**
   * Worker threads in the API process for verified-run chunks, merges and nominal evaluations (default: the number
   * of cores, or YIELD_WORKERS). 0 is allowed only with REDIS_URL: then worker processes do all of it.
   */
  EMBEDDED_WORKERS: z.coerce.number().int().min(0).max(64).optional(),
  /** With a Redis URL, verified-run chunks go through BullMQ to worker processes (`node apps/api/dist/worker.js`). */
  REDIS_URL: z.string().url().optional(),
  /** Chunks the API keeps queued in Redis at once (the fair scheduler's slots when workers are remote). */
  REDIS_CHUNKS_IN_FLIGHT: z.coerce.number().int().min(1).max(1024).default(16),
  /** Worker process: chunks computed at once (one thread each). */
  WORKER_CONCURRENCY: z.coerce.number().int().min(1).max(64).default(1),
  /** Worker process: ms after which a chunk whose worker stopped answering is handed to another worker. */
  WORKER_LOCK_MS: z.coerce.number().int().min(1000).max(600_000).default(30_000),
  /** Caps on verified runs queued or running at once, per requester and per workspace (a 429 names the cap). */
  MAX_ACTIVE_RUNS_PER_USER: z.coerce.number().int().min(1).max(1000).default(4),
  MAX_ACTIVE_RUNS_PER_WORKSPACE: z.coerce.number().int().min(1).max(10_000).default(16),
  /** pino log level; tests default to "silent". */
  LOG_LEVEL: z.enum(["fatal", "error", "warn", "info", "debug", "trace", "silent"]).optional(),
  /** Milliseconds SIGTERM waits for requests in flight before closing the remaining connections. */
  SHUTDOWN_GRACE_MS: z.coerce.number().int().min(0).max(600_000).default(25_000),
});

type ParsedEnv = z.infer<typeof EnvSchema>;

/** The configuration, with the production-sensitive switches resolved to plain booleans. */
export type Env = Omit<ParsedEnv, "DEMO_DATA" | "MAIL_CAPTURE"> & {
  /** Load the demo workspace into a new database (explicit DEMO_DATA, else on outside production). */
  DEMO_DATA: boolean;
  /** Mail goes to the local capture and the outbox page (no SMTP_HOST; explicit in production). */
  MAIL_CAPTURE: boolean;
};

/**
 * Parses and checks the configuration. `sendsMail: false` is for processes that never send e-mail (the Redis worker,
 * the backup command): they start without a mail server.
 */
export function loadEnv(source: NodeJS.ProcessEnv = process.env, options: { sendsMail?: boolean } = {}): Env {
  const parsed = EnvSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid configuration:\n  ${lines.join("\n  ")}`);
  }
  const data = parsed.data;
  const production = data.NODE_ENV === "production";
  if (data.EMBEDDED_WORKERS === 0 && !data.REDIS_URL)
    throw new Error(
      "Invalid configuration:\n  EMBEDDED_WORKERS: 0 needs REDIS_URL (worker processes to do the work)",
    );
  if (data.SMTP_HOST && data.MAIL_CAPTURE === true) {
    throw new Error(
      "Invalid configuration:\n  MAIL_CAPTURE=true and SMTP_HOST are both set: choose a real mail server or the local capture.",
    );
  }
  const capture = !data.SMTP_HOST && (data.MAIL_CAPTURE ?? !production);
  if (!data.SMTP_HOST && !capture && options.sendsMail !== false) {
    // Refusing to start beats silently dropping password-reset and invitation mail.
    throw new Error(
      "Invalid configuration:\n  Stackproof has nowhere to send e-mail. Set SMTP_HOST (and SMTP_PORT, SMTP_USER, " +
        "SMTP_PASSWORD) for a real mail server, or MAIL_CAPTURE=true to keep mail in the local outbox " +
        "(readable by workspace admins; for demos and trials).",
    );
  }
  return { ...data, DEMO_DATA: data.DEMO_DATA ?? !production, MAIL_CAPTURE: capture };
}

/** Log level: LOG_LEVEL, else silent in tests, debug in development, info in production. */
export function logLevelOf(env: Env): string {
  return (
    env.LOG_LEVEL ?? (env.NODE_ENV === "test" ? "silent" : env.NODE_ENV === "development" ? "debug" : "info")
  );
}
