// Outgoing e-mail over SMTP (nodemailer). Without SMTP_HOST a capture server on 127.0.0.1 receives every message
// and stores it in the captured_mail table, which the outbox page reads.
import path from "node:path";
import { randomBytes } from "node:crypto";
import nodemailer, { type Transporter } from "nodemailer";
import type { Env } from "../env.ts";
import type { Db } from "../db/client.ts";
import { openDatabase, runMigrations } from "../db/client.ts";
import { startCaptureServer, type CaptureServer } from "./capture.ts";
import { createOutbox, messageIdFor, type Outbox } from "./outbox.ts";

export type { Outbox, OutboxDetail, OutboxItem } from "./outbox.ts";
export { templates, type MailContent } from "./templates.ts";
export { appOrigin, appUrl } from "./links.ts";

export interface MailMessage {
  /** One address, or several separated by commas. */
  to: string;
  subject: string;
  text: string;
  html?: string;
  /** The workspace this message is sent for (tags its Message-ID; the outbox shows it to that workspace only). */
  workspaceId?: string;
}

export interface MailService {
  /** True when messages go to the local capture server (no SMTP_HOST): the outbox routes are on. */
  readonly captureMode: boolean;
  /** The captured messages; null when a real SMTP host is configured. */
  readonly outbox: Outbox | null;
  /** Port of the capture server, or null. */
  readonly capturePort: number | null;
  /**
   * Sends a message. Never rejects: failures are logged. In capture mode the message is stored when this resolves.
   * Handlers that must not reveal timing (password reset) call it without awaiting.
   */
  send(message: MailMessage): Promise<void>;
  /** Resolves when every send started so far has finished. */
  flush(): Promise<void>;
  close(): Promise<void>;
}

/** Same file as the context's database; the capture store keeps its own connection. */
function databaseFile(env: Env): string {
  return env.DATABASE_FILE ?? path.join(env.DATA_DIR, "stackproof.db");
}

export async function createMailService(env: Env): Promise<MailService> {
  let capture: CaptureServer | null = null;
  let store: Db | null = null;
  let transport: Transporter;

  if (env.SMTP_HOST) {
    transport = nodemailer.createTransport({
      host: env.SMTP_HOST,
      port: env.SMTP_PORT ?? (env.SMTP_SECURE ? 465 : 587),
      secure: env.SMTP_SECURE ?? false,
      auth: env.SMTP_USER ? { user: env.SMTP_USER, pass: env.SMTP_PASSWORD ?? "" } : undefined,
    });
  } else {
    const file = databaseFile(env);
    store = openDatabase(file);
    // A separate in-memory database does not share the app's tables; give it its own.
    if (file === ":memory:") runMigrations(store);
    try {
      capture = await startCaptureServer(store, env.CAPTURE_SMTP_PORT);
    } catch (err) {
      store.$client.close();
      throw err;
    }
    transport = nodemailer.createTransport({
      host: "127.0.0.1",
      port: capture.port,
      secure: false,
      ignoreTLS: true,
    });
  }

  const outbox = store ? createOutbox(store) : null;
  const pending = new Set<Promise<void>>();

  async function deliver(message: MailMessage): Promise<void> {
    try {
      await transport.sendMail({
        from: env.MAIL_FROM,
        to: message.to,
        subject: message.subject,
        text: message.text,
        html: message.html,
        messageId: messageIdFor(message.workspaceId, randomBytes(12).toString("hex")),
      });
    } catch (err) {
      console.error(`mail: could not send "${message.subject}" to ${message.to}:`, err);
    }
  }

  return {
    captureMode: capture !== null,
    outbox,
    capturePort: capture?.port ?? null,
    send(message) {
      const p = deliver(message).finally(() => pending.delete(p));
      pending.add(p);
      return p;
    },
    async flush() {
      while (pending.size > 0) await Promise.all([...pending]);
    },
    async close() {
      while (pending.size > 0) await Promise.all([...pending]);
      transport.close();
      if (capture) await capture.close();
      store?.$client.close();
    },
  };
}
