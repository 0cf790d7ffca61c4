// Online backup while another connection writes, then restore: every row committed before the copy is in it,
// the copy is one consistent state (no gap in the committed sequence), and it passes SQLite's integrity check.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { spawn } from "node:child_process";
import Database from "better-sqlite3";
import { afterAll, describe, expect, it } from "vitest";
import { backupDatabase, restoreDatabase } from "../../src/db/backup.ts";
import { migrationStatus, openDatabase, runMigrations } from "../../src/db/client.ts";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "stackproof-backup-"));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

// A separate process commits one row per transaction, numbered 1, 2, 3, ..., and prints each number it committed.
const WRITER = `
const Database = require(process.argv[1]);
const db = new Database(process.argv[2]);
db.pragma("journal_mode = WAL");
db.pragma("busy_timeout = 5000");
const insert = db.prepare("INSERT INTO backup_probe (n, pad) VALUES (?, ?)");
let n = 0;
const pad = "x".repeat(2000);
setInterval(() => { for (let i = 0; i < 5; i++) { insert.run(++n, pad); process.stdout.write(n + "\\n"); } }, 1);
`;

describe("backup and restore", () => {
  it("a backup taken during writes restores every row committed before it", async () => {
    const live = path.join(dir, "live.db");
    const db = openDatabase(live);
    runMigrations(db);
    db.$client.exec("CREATE TABLE backup_probe (n INTEGER PRIMARY KEY, pad TEXT)");
    // Some bulk so that the copy takes several steps while the writer goes on.
    const fill = db.$client.prepare("INSERT INTO backup_probe (n, pad) VALUES (?, ?)");
    db.$client.transaction(() => {
      for (let i = 1; i <= 3000; i++) fill.run(-i, "y".repeat(2000));
    })();
    db.$client.close();

    const writer = spawn(process.execPath, ["-e", WRITER, require.resolve("better-sqlite3"), live], {
      stdio: ["ignore", "pipe", "inherit"],
    });
    let committed = 0;
    writer.stdout.on("data", (d: Buffer) => {
      const lines = d.toString().trim().split("\n");
      committed = Math.max(committed, Number(lines[lines.length - 1]));
    });
    try {
      for (let waited = 0; committed < 200; waited += 10) {
        if (waited > 20_000) throw new Error(`the writer committed only ${committed} rows`);
        await new Promise((r) => setTimeout(r, 10));
      }
      const before = committed;
      const copy = path.join(dir, "copy.db");
      const pages = await backupDatabase(live, copy);
      const afterCopy = committed;
      expect(pages).toBeGreaterThan(100);
      expect(afterCopy).toBeGreaterThan(before); // the writer kept committing during the copy

      // Restore into a fresh place, as the restore command does for DATABASE_FILE.
      const target = path.join(dir, "restored", "stackproof.db");
      await restoreDatabase(copy, target);
      const restored = new Database(target, { readonly: true });
      expect(restored.pragma("integrity_check", { simple: true })).toBe("ok");
      const rows = restored
        .prepare("SELECT n FROM backup_probe WHERE n > 0 ORDER BY n")
        .pluck()
        .all() as number[];
      const max = rows[rows.length - 1] ?? 0;
      expect(max).toBeGreaterThanOrEqual(before); // every row committed before the backup started
      expect(rows).toEqual(Array.from({ length: max }, (_, i) => i + 1)); // one consistent state: no gaps
      expect(restored.prepare("SELECT count(*) FROM backup_probe WHERE n < 0").pluck().get()).toBe(3000);
      restored.close();
      const check = openDatabase(target);
      expect(migrationStatus(check).upToDate).toBe(true);
      check.$client.close();
    } finally {
      writer.kill();
    }
  }, 60_000);

  it("refuses to overwrite a file with a backup and to restore a file that is not a database", async () => {
    const live = path.join(dir, "small.db");
    new Database(live).exec("CREATE TABLE t (x)");
    fs.writeFileSync(path.join(dir, "taken.db"), "");
    await expect(backupDatabase(live, path.join(dir, "taken.db"))).rejects.toThrow(/exists/);
    fs.writeFileSync(path.join(dir, "junk.db"), "not a database at all, just text ".repeat(200));
    await expect(restoreDatabase(path.join(dir, "junk.db"), path.join(dir, "x.db"))).rejects.toThrow();
    expect(fs.existsSync(path.join(dir, "x.db"))).toBe(false);
  });
});
