import fs from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import Database from "better-sqlite3";
import { drizzle, type BetterSQLite3Database } from "drizzle-orm/better-sqlite3";
import { migrate } from "drizzle-orm/better-sqlite3/migrator";
import * as schema from "./schema.ts";

export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database };

// src/db/client.ts in development, dist/index.js when built: the committed migrations are apps/api/drizzle either way.
const here = path.dirname(fileURLToPath(import.meta.url));
export const MIGRATIONS_DIR =
  [path.resolve(here, "../../drizzle"), path.resolve(here, "../drizzle")].find((d) =>
    fs.existsSync(path.join(d, "meta/_journal.json")),
  ) ?? path.resolve(here, "../../drizzle");

/** Opens (creating if needed) the SQLite file with WAL, foreign keys and a busy timeout. */
export function openDatabase(file: string): Db {
  if (file !== ":memory:") fs.mkdirSync(path.dirname(file), { recursive: true });
  const sqlite = new Database(file);
  sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("foreign_keys = ON");
  sqlite.pragma("busy_timeout = 5000");
  sqlite.pragma("synchronous = NORMAL");
  return drizzle(sqlite, { schema }) as Db;
}

/** Applies every committed migration that has not run yet. */
export function runMigrations(db: Db): void {
  migrate(db, { migrationsFolder: MIGRATIONS_DIR });
}

export interface MigrationStatus {
  applied: number;
  available: number;
  upToDate: boolean;
}

export function migrationStatus(db: Db): MigrationStatus {
  const journal = JSON.parse(fs.readFileSync(path.join(MIGRATIONS_DIR, "meta/_journal.json"), "utf8")) as {
    entries: unknown[];
  };
  const row = db.$client
    .prepare("SELECT count(*) AS n FROM sqlite_master WHERE type = 'table' AND name = '__drizzle_migrations'")
    .get() as { n: number };
  const applied =
    row.n > 0
      ? (db.$client.prepare("SELECT count(*) AS n FROM __drizzle_migrations").get() as { n: number }).n
      : 0;
  return { applied, available: journal.entries.length, upToDate: applied === journal.entries.length };
}
