// Captured e-mail (capture mode only: no SMTP_HOST). With a real SMTP host these answer 404.
import type { Router } from "express";
import { z } from "zod";
import type { AppContext } from "../../context.ts";
import { HttpError, notFound } from "../../lib/errors.ts";
import { pageQuery, pageSchema } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import { IdParams } from "@stackproof/contracts";

const OutboxItem = z.object({ id: z.string(), to: z.string(), subject: z.string(), receivedAt: z.string() });
const OutboxDetail = OutboxItem.extend({ from: z.string(), text: z.string(), html: z.string().nullable() });

export function outboxRoutes(ctx: AppContext, router: Router): void {
  const outbox = () => {
    if (!ctx.mail.outbox) {
      throw new HttpError(404, "outbox_disabled", "E-mail goes to a real SMTP server; there is no local outbox.");
    }
    return ctx.mail.outbox;
  };

  route(
    router,
    {
      method: "get",
      path: "/outbox",
      summary: "E-mails captured by the local SMTP server, newest first (capture mode only)",
      tag: "access",
      access: "member",
      query: pageQuery,
      response: pageSchema(OutboxItem),
      errors: { 404: "A real SMTP host is configured (outbox_disabled)" },
    },
    ({ query }) => outbox().list(query),
  );

  route(
    router,
    {
      method: "get",
      path: "/outbox/:id",
      summary: "One captured e-mail with its text and HTML (capture mode only)",
      tag: "access",
      access: "member",
      params: IdParams,
      response: OutboxDetail,
      errors: { 404: "Unknown message, or a real SMTP host is configured (outbox_disabled)" },
    },
    ({ params }) => {
      const message = outbox().get(params.id);
      if (!message) throw notFound("Message");
      return message;
    },
  );
}
