// Reads the captured messages (capture mode only), newest first.
import { desc, eq } from "drizzle-orm";
import type { Db } from "../db/client.ts";
import { capturedMail } from "../db/schema.ts";
import { keysetWhere, toPage, type Page } from "../lib/pagination.ts";

export interface OutboxItem {
  id: string;
  to: string;
  subject: string;
  receivedAt: string;
}

export interface OutboxDetail extends OutboxItem {
  from: string;
  text: string;
  html: string | null;
}

export interface Outbox {
  list(page: { limit: number; cursor?: string }): Page<OutboxItem>;
  get(id: string): OutboxDetail | null;
  /** Every captured message, oldest first (for tests and tools). */
  all(): OutboxDetail[];
}

type Row = typeof capturedMail.$inferSelect;

const detail = (r: Row): OutboxDetail => ({
  id: r.id,
  to: r.to,
  from: r.from,
  subject: r.subject,
  text: r.text,
  html: r.html,
  receivedAt: r.receivedAt.toISOString(),
});

export function createOutbox(store: Db): Outbox {
  return {
    list({ limit, cursor }) {
      const rows = store
        .select()
        .from(capturedMail)
        .where(keysetWhere([capturedMail.receivedAt, capturedMail.id], cursor, "desc"))
        .orderBy(desc(capturedMail.receivedAt), desc(capturedMail.id))
        .limit(limit + 1)
        .all();
      return toPage(
        rows,
        limit,
        (r) => [r.receivedAt, r.id],
        (r) => ({ id: r.id, to: r.to, subject: r.subject, receivedAt: r.receivedAt.toISOString() }),
      );
    },
    get(id) {
      const row = store.select().from(capturedMail).where(eq(capturedMail.id, id)).get();
      return row ? detail(row) : null;
    },
    all() {
      return store.select().from(capturedMail).orderBy(capturedMail.receivedAt, capturedMail.id).all().map(detail);
    },
  };
}
