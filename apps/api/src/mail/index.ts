// Outgoing e-mail. Placeholder until the mail service lands.
import type { Env } from "../env.ts";

export interface MailService {
  close(): Promise<void>;
}

export async function createMailService(_env: Env): Promise<MailService> {
  return { async close() {} };
}
