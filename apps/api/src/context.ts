// Everything a request handler needs, built once per process (or per test).
import path from "node:path";
import type { Env } from "./env.ts";
import { openDatabase, runMigrations, type Db } from "./db/client.ts";
import { createMailService, type MailService } from "./mail/index.ts";
import { createJobService, type JobService } from "./yield/index.ts";
import { createCompute, type Compute } from "./yield/compute.ts";
import { createLogger, type Logger } from "./lib/log.ts";

export interface AppContext {
  env: Env;
  db: Db;
  mail: MailService;
  jobs: JobService;
  /** The worker pool (threads here, or worker processes through Redis): yield chunks and nominal evaluations. */
  compute: Compute;
  /** pino logger (JSON lines; the level comes from LOG_LEVEL). */
  log: Logger;
  /** Closes the job service, the pool, mail and the database (after the chunks and tasks in flight are back). */
  close(): Promise<void>;
}

export async function createContext(env: Env): Promise<AppContext> {
  const file = env.DATABASE_FILE ?? path.join(env.DATA_DIR, "stackproof.db");
  const db = openDatabase(file);
  runMigrations(db);
  const mail = await createMailService(env);
  const compute = createCompute(env);
  const jobs = createJobService({ env, db, mail, compute });
  return {
    env,
    db,
    mail,
    jobs,
    compute,
    log: createLogger(env),
    async close() {
      await jobs.close();
      await compute.close();
      await mail.close();
      db.$client.close();
    },
  };
}
