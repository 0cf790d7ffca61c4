// Reads the captured messages (capture mode only), newest first. What the outbox page may show is decided here:
// only mail sent for the reader's workspace (or account mail to one of its members), and single-use links
// (password reset, invitation) only to their addressee.
import { and, desc, eq, or, sql, type SQL } from "drizzle-orm";
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

/** Who is reading: their workspace, its members' addresses, and their own address. */
export interface OutboxViewer {
  /** Mail sent on behalf of this workspace (tagged in its Message-ID, see messageIdFor) is shown. */
  workspaceId: string;
  /** Lower-case addresses of the workspace's members: untagged mail (password resets) to one of them is shown. */
  recipients: readonly string[];
  /** The reader's own address: single-use links in mail to it are shown. */
  self: string;
}

/**
 * The Message-ID of an outgoing message: random, tagged with the workspace it is sent for, so the capture can tell
 * whose mail it is without another column. Account mail (password reset) carries no workspace.
 */
export function messageIdFor(workspaceId: string | undefined, random: string): string {
  return workspaceId ? `<${random}.ws-${workspaceId}@stackproof.mail>` : `<${random}.account@stackproof.mail>`;
}

export interface Outbox {
  list(viewer: OutboxViewer, page: { limit: number; cursor?: string }): Page<OutboxItem>;
  /** One message as `viewer` may see it (single-use links hidden unless addressed to them), or null. */
  get(viewer: OutboxViewer, id: string): OutboxDetail | null;
  /** Every captured message, oldest first, unredacted (tests and tools only; no route reads this). */
  all(): OutboxDetail[];
}

/** Shown instead of a password-reset or invitation link to anyone but its addressee. */
export const HIDDEN_LINK = "[single-use link hidden: only its addressee can see it]";

/** Links that carry a token (…/reset-password?token=…, …/accept-invitation?token=…), also HTML-escaped ones. */
const TOKEN_LINK = /https?:\/\/[^\s"'<>]*?[?&](?:amp;)?token=[^\s"'<>]*/gi;

/** Replaces every token-bearing link with HIDDEN_LINK. */
export function hideTokenLinks(s: string): string {
  return s.replace(TOKEN_LINK, HIDDEN_LINK);
}

/** The plain addresses of a To header ("A <a@x>, b@y" → ["a@x", "b@y"]), lower case. */
export function addressesOf(to: string): string[] {
  const out: string[] = [];
  for (const part of to.split(",")) {
    const angle = /<([^>]+)>/.exec(part);
    const address = (angle?.[1] ?? part).trim().toLowerCase();
    if (address) out.push(address);
  }
  return out;
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

/**
 * SQL: the message's To header names one of `recipients` as a whole address. The capture stores To as plain
 * addresses joined by ", " (capture.ts); the "<…>" form covers rows stored with display names.
 */
function addressedToAny(recipients: readonly string[]): SQL {
  if (recipients.length === 0) return sql`0`;
  const padded = sql`(', ' || lower(${capturedMail.to}) || ',')`;
  const terms = recipients.map(
    (r) => sql`(instr(${padded}, ${`, ${r},`}) > 0 or instr(lower(${capturedMail.to}), ${`<${r}>`}) > 0)`,
  );
  return or(...terms) ?? sql`0`;
}

/** SQL: mail tagged for the viewer's workspace, or untagged mail addressed to one of its members. */
function visibleWhere(viewer: OutboxViewer): SQL {
  const id = sql`coalesce(${capturedMail.messageId}, '')`;
  return sql`(instr(${id}, ${`.ws-${viewer.workspaceId}@`}) > 0 or (instr(${id}, '.ws-') = 0 and ${addressedToAny(viewer.recipients)}))`;
}

function redactFor(viewer: OutboxViewer, d: OutboxDetail): OutboxDetail {
  const to = addressesOf(d.to);
  // Shown only when the reader is the sole addressee: a link in mail to several people is nobody's alone.
  if (to.length === 1 && to[0] === viewer.self.toLowerCase()) return d;
  return { ...d, text: hideTokenLinks(d.text), html: d.html === null ? null : hideTokenLinks(d.html) };
}

export function createOutbox(store: Db): Outbox {
  return {
    list(viewer, { limit, cursor }) {
      const rows = store
        .select()
        .from(capturedMail)
        .where(and(visibleWhere(viewer), keysetWhere([capturedMail.receivedAt, capturedMail.id], cursor, "desc")))
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
    get(viewer, id) {
      const row = store.select().from(capturedMail).where(and(eq(capturedMail.id, id), visibleWhere(viewer))).get();
      if (!row) return null;
      return redactFor(viewer, detail(row));
    },
    all() {
      return store.select().from(capturedMail).orderBy(capturedMail.receivedAt, capturedMail.id).all().map(detail);
    },
  };
}
