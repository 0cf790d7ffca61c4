// Online backup and restore of the SQLite file (SQLite's backup API through better-sqlite3's .backup()).
import fs from "node:fs";
import path from "node:path";
import Database from "better-sqlite3";

/**
 * Copies a live database to `destination` while the server keeps writing: SQLite's online backup copies the pages
 * inside one read transaction, so the copy is one consistent state of the database (every transaction committed
 * before that point, none half-applied). Resolves to the pages copied.
 */
const ALL_PAGES = 2 ** 30;

export async function backupDatabase(source: string, destination: string): Promise<number> {
  if (!fs.existsSync(source)) throw new RangeError(`no database at ${source}`);
  if (fs.existsSync(destination))
    throw new RangeError(`${destination} exists: choose a new file for the backup`);
  fs.mkdirSync(path.dirname(path.resolve(destination)), { recursive: true });
  const db = new Database(source, { fileMustExist: true });
  try {
    db.pragma("busy_timeout = 5000");
    // Whole remaining file per step: a step is one read transaction (WAL lets writers go on meanwhile), whereas small
    // steps restart whenever another connection writes between them and never finish under steady writes.
    // (The file grows while it is copied, so a step sized to the current page count can fall short and restart
    // for ever: ask for more pages than any database here has, which SQLite reads as "all of them".)
    const { totalPages } = await db.backup(destination, { progress: () => ALL_PAGES });
    return totalPages;
  } finally {
    db.close();
  }
}

/**
 * Replaces the database at `target` with the backup at `backupFile`. The server must be stopped (a running
 * server keeps its own view of the old file). The backup is checked (integrity_check) before anything is replaced;
 * the old file is kept as `<target>.before-restore`.
 */
export async function restoreDatabase(backupFile: string, target: string): Promise<void> {
  if (!fs.existsSync(backupFile)) throw new RangeError(`no backup at ${backupFile}`);
  const backup = new Database(backupFile, { readonly: true, fileMustExist: true });
  try {
    const check = backup.pragma("integrity_check", { simple: true });
    if (check !== "ok")
      throw new RangeError(`${backupFile} fails SQLite's integrity check: ${String(check)}`);
    fs.mkdirSync(path.dirname(path.resolve(target)), { recursive: true });
    if (fs.existsSync(target)) {
      // fold the old file's write-ahead log in so that the kept copy is whole
      const old = new Database(target);
      old.pragma("wal_checkpoint(TRUNCATE)");
      old.close();
      fs.renameSync(target, `${target}.before-restore`);
    }
    for (const suffix of ["-wal", "-shm"]) fs.rmSync(target + suffix, { force: true });
    await backup.backup(target);
  } finally {
    backup.close();
  }
}
