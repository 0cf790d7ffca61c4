// Reading the e-mails the app sent, from the capture store of the loopback SMTP server (capture mode).
import type { TestServer } from "./context.ts";
import type { OutboxDetail } from "../../src/mail/index.ts";

/** Every captured message, oldest first, after waiting for sends in flight. */
export async function capturedMail(server: TestServer): Promise<OutboxDetail[]> {
  await server.ctx.mail.flush();
  const outbox = server.ctx.mail.outbox;
  if (!outbox) throw new Error("The test server is not in capture mode (SMTP_HOST is set).");
  return outbox.all();
}

/** The newest message to `address` (optionally whose subject matches); throws when there is none. */
export async function lastMailTo(server: TestServer, address: string, subject?: RegExp): Promise<OutboxDetail> {
  const messages = (await capturedMail(server)).filter(
    (m) => m.to.toLowerCase().includes(address.toLowerCase()) && (!subject || subject.test(m.subject)),
  );
  const last = messages[messages.length - 1];
  if (!last) throw new Error(`No e-mail to ${address}${subject ? ` matching ${subject}` : ""} was captured.`);
  return last;
}

/** The first link in the text part whose path is `pathname`, e.g. "/accept-invitation". */
export function linkIn(message: { text: string }, pathname: string): URL {
  for (const match of message.text.matchAll(/https?:\/\/[^\s<>"]+/g)) {
    const url = new URL(match[0]);
    if (url.pathname === pathname) return url;
  }
  throw new Error(`No ${pathname} link in the message:\n${message.text}`);
}

/** The `token` query parameter of the first `pathname` link in the message. */
export function tokenIn(message: { text: string }, pathname: string): string {
  const token = linkIn(message, pathname).searchParams.get("token");
  if (!token) throw new Error(`The ${pathname} link has no token.`);
  return token;
}
