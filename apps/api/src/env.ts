// The only place that reads process.env: configuration is parsed and validated once.
import { z } from "zod";
import path from "node:path";
import { fileURLToPath } from "node:url";

const apiRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
export const repoRoot = path.resolve(apiRoot, "../..");

const boolish = z
  .enum(["true", "false", "1", "0"])
  .transform((v) => v === "true" || v === "1");

const EnvSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  HOST: z.string().default("127.0.0.1"),
  PORT: z.coerce.number().int().min(0).max(65535).default(5317),
  /** Public URL that links in e-mails point at. Defaults to http://HOST:PORT. */
  PUBLIC_URL: z.string().url().optional(),
  DATA_DIR: z.string().default(path.join(repoRoot, "data")),
  /** SQLite file; defaults to DATA_DIR/stackproof.db. */
  DATABASE_FILE: z.string().optional(),
  /** Load the fictional demo workspace when the database is new. */
  DEMO_DATA: boolish.default(true),
  /** Built web app served in production. */
  WEB_DIST: z.string().default(path.join(repoRoot, "apps/web/dist")),
  /** Outgoing mail. Without SMTP_HOST a capture server on loopback keeps messages for the outbox page. */
  SMTP_HOST: z.string().optional(),
  SMTP_PORT: z.coerce.number().int().optional(),
  SMTP_USER: z.string().optional(),
  SMTP_PASSWORD: z.string().optional(),
  SMTP_SECURE: boolish.optional(),
  MAIL_FROM: z.string().default("Stackproof <no-reply@stackproof.local>"),
  /** Port of the local capture SMTP server (0 = any free port). */
  CAPTURE_SMTP_PORT: z.coerce.number().int().min(0).max(65535).default(0),
  /** Worker threads for verified yield runs; defaults to the number of cores. */
  YIELD_WORKERS: z.coerce.number().int().min(1).max(64).optional(),
});

export type Env = z.infer<typeof EnvSchema>;

export function loadEnv(source: NodeJS.ProcessEnv = process.env): Env {
  const parsed = EnvSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid configuration:\n  ${lines.join("\n  ")}`);
  }
  return parsed.data;
}
