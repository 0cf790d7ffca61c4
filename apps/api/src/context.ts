// Everything a request handler needs, built once per process (or per test).
import path from "node:path";
import type { Env } from "./env.ts";
import { openDatabase, runMigrations, type Db } from "./db/client.ts";
import { createMailService, type MailService } from "./mail/index.ts";
import { createJobService, type JobService } from "./yield/index.ts";
import { isNewDatabase, seedDemo, type DemoSummary } from "./demo/index.ts";

export interface AppContext {
  env: Env;
  db: Db;
  mail: MailService;
  jobs: JobService;
  /** Set when this start-up loaded the demo workspace into a new database. */
  demo: DemoSummary | null;
  /** Closes mail, workers and the database. */
  close(): Promise<void>;
}

export async function createContext(env: Env): Promise<AppContext> {
  const file = env.DATABASE_FILE ?? path.join(env.DATA_DIR, "stackproof.db");
  const db = openDatabase(file);
  runMigrations(db);
  // Demo data only into a new database (no workspace yet), before the job service looks for runs to resume.
  const demo = env.DEMO_DATA && isNewDatabase(db) ? await seedDemo(db) : null;
  const mail = await createMailService(env);
  const jobs = createJobService({ env, db, mail });
  return {
    env,
    db,
    mail,
    jobs,
    demo,
    async close() {
      await jobs.close();
      await mail.close();
      db.$client.close();
    },
  };
}
