// Verified yield runs in worker threads. Placeholder until the job service lands.
import type { Env } from "../env.ts";
import type { Db } from "../db/client.ts";
import type { MailService } from "../mail/index.ts";

export interface JobService {
  close(): Promise<void>;
}

export function createJobService(_deps: { env: Env; db: Db; mail: MailService }): JobService {
  return { async close() {} };
}
