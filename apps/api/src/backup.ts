// Backup command: `node dist/backup.js backup <file>` copies the live database (the server may keep running);
// `node dist/backup.js restore <file>` puts a backup in place (stop the server first). The database is the one the
// server uses (DATABASE_FILE, or DATA_DIR/stackproof.db). In development: `pnpm --filter @stackproof/api backup ...`.
import path from "node:path";
import { loadEnv } from "./env.ts";
import { backupDatabase, restoreDatabase } from "./db/backup.ts";

const [command, file] = process.argv.slice(2);
const env = loadEnv(process.env, { sendsMail: false });
const database = env.DATABASE_FILE ?? path.join(env.DATA_DIR, "stackproof.db");
const usage = "usage: backup.js backup <new-file> | backup.js restore <backup-file>";

try {
  if (!file || (command !== "backup" && command !== "restore")) {
    console.error(usage);
    process.exit(2);
  }
  if (command === "backup") {
    const pages = await backupDatabase(database, file);
    console.log(`Backed up ${database} to ${file} (${pages} pages).`);
  } else {
    await restoreDatabase(file, database);
    console.log(
      `Restored ${file} into ${database} (the previous file is kept as ${database}.before-restore).`,
    );
  }
} catch (err) {
  console.error(`${command}: ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
}
