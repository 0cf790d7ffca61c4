// What the domain functions that send mail need, and no more: the database, the mail sender, and the configuration
// the links in a message are built from. Routes pass these, never the request or the whole context.
import type { Db } from "../db/client.ts";
import type { Env } from "../env.ts";
import type { MailService } from "../mail/index.ts";

export interface MailDeps {
  db: Db;
  mail: Pick<MailService, "send">;
  env: Env;
}

/** The member acting (who the audit log and the decisions name). */
export interface Actor {
  id: string;
  name: string;
}
