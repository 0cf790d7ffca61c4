// A loopback SMTP server that parses each received message and stores it for the outbox.
import type { AddressInfo } from "node:net";
import { SMTPServer } from "smtp-server";
import { simpleParser, type AddressObject } from "mailparser";
import type { Db } from "../db/client.ts";
import { capturedMail } from "../db/schema.ts";
import { newId } from "../auth/tokens.ts";

export interface CaptureServer {
  port: number;
  close(): Promise<void>;
}

function addressText(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return "";
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(", ");
}

/** Plain addresses, lower case, joined by ", " (the outbox matches recipients against this). */
function plainAddresses(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return "";
  return (Array.isArray(a) ? a : [a])
    .flatMap((x) => x.value)
    .map((v) => (v.address ?? "").toLowerCase())
    .filter(Boolean)
    .join(", ");
}

export async function startCaptureServer(store: Db, port: number): Promise<CaptureServer> {
  const server = new SMTPServer({
    secure: false,
    authOptional: true,
    disabledCommands: ["AUTH", "STARTTLS"],
    logger: false,
    size: 10 * 1024 * 1024,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address).join(", ");
          store
            .insert(capturedMail)
            .values({
              id: newId(),
              messageId: parsed.messageId ?? null,
              to: plainAddresses(parsed.to) || envelopeTo.toLowerCase(),
              from: addressText(parsed.from),
              subject: parsed.subject ?? "(no subject)",
              text: parsed.text ?? "",
              html: typeof parsed.html === "string" ? parsed.html : null,
              receivedAt: new Date(),
            })
            .run();
          callback();
        })
        .catch((err: unknown) => {
          console.error("mail capture: could not store a message:", err);
          callback(err instanceof Error ? err : new Error(String(err)));
        });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", (err: Error) =>
      reject(
        new Error(
          `The local mail capture server could not listen on 127.0.0.1:${port} (${err.message}). ` +
            "Set CAPTURE_SMTP_PORT to a free port (0 picks one) or configure SMTP_HOST.",
        ),
      ),
    );
    server.listen(port, "127.0.0.1", () => {
      server.removeAllListeners("error");
      resolve();
    });
  });
  server.on("error", (err) => console.error("mail capture server:", err));
  const address = server.server.address() as AddressInfo;
  return {
    port: address.port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
