// Review threads: anchors, the anchor verdict on a given revision, and @mentions.
import { and, asc, eq, inArray, lte } from "drizzle-orm";
import { evaluateSpec, type SpecMask, type SpecResult } from "@stackproof/optics";
import type { Db } from "../db/client.ts";
import { comments, memberships, threads, users, type ThreadAnchor } from "../db/schema.ts";
import type { DbOrTx } from "../lib/audit.ts";
import { maskOf, person, stackOf, userNames, type RevisionContext, type ThreadRow } from "./load.ts";

/**
 * Whether a thread's anchor passes on a revision, from that revision's nominal evaluation:
 * - band: that band's verdict; null when the revision's mask has no band with that id.
 * - range [start, stop]: true when every band overlapping the range passes; null when no band overlaps.
 * - layer: null (a layer has no verdict of its own).
 * - design: the overall verdict (every band passes).
 */
export function anchorPasses(anchor: ThreadAnchor, mask: SpecMask, nominal: SpecResult): boolean | null {
  switch (anchor.kind) {
    case "band":
      return nominal.bands.find((b) => b.id === anchor.bandId)?.pass ?? null;
    case "range": {
      const ids = new Set(
        mask.bands.filter((b) => b.start <= anchor.stop && b.stop >= anchor.start).map((b) => b.id),
      );
      if (ids.size === 0) return null;
      return nominal.bands.filter((b) => ids.has(b.id)).every((b) => b.pass);
    }
    case "layer":
      return null;
    case "design":
      return nominal.pass;
  }
}

export function nominalOf(rc: RevisionContext): SpecResult {
  return evaluateSpec(stackOf(rc.revision), maskOf(rc.revision, rc.program));
}

/** Threads opened on this revision or an earlier one of the same design (open and resolved), oldest first. */
export function threadsForRevision(db: DbOrTx, rc: RevisionContext): ThreadRow[] {
  return db
    .select()
    .from(threads)
    .where(and(eq(threads.designId, rc.design.id), lte(threads.revisionNumber, rc.revision.number)))
    .orderBy(asc(threads.createdAt), asc(threads.id))
    .all();
}

/** Open blocking threads that count against this revision (opened on it or carried forward). */
export function openBlockingThreads(db: DbOrTx, rc: RevisionContext): ThreadRow[] {
  return threadsForRevision(db, rc).filter((t) => t.status === "open" && t.severity === "blocking");
}

export interface Member {
  id: string;
  name: string;
  email: string;
}

export function workspaceMembers(db: DbOrTx, workspaceId: string): Member[] {
  return db
    .select({ id: users.id, name: users.name, email: users.email })
    .from(memberships)
    .innerJoin(users, eq(memberships.userId, users.id))
    .where(eq(memberships.workspaceId, workspaceId))
    .all();
}

/** A mention ends at the end of the text, before a non-word character, or before a full stop that ends a sentence. */
function endsMention(text: string, end: number): boolean {
  const c = text[end];
  if (c === undefined) return true;
  if (c === ".") {
    const d = text[end + 1];
    return d === undefined || !/[\p{L}\p{N}_]/u.test(d);
  }
  return !/[\p{L}\p{N}_@.-]/u.test(c);
}

/**
 * Members mentioned in a comment: `@` followed by a member's e-mail, full name or first name (case-insensitive;
 * a first name counts only when exactly one member has it). The mention must end at a word boundary.
 */
export function findMentions(body: string, members: readonly Member[]): Member[] {
  const text = body.toLowerCase();
  const firstCount = new Map<string, number>();
  const firstOf = (m: Member) => m.name.trim().split(/\s+/)[0]?.toLowerCase() ?? "";
  for (const m of members) firstCount.set(firstOf(m), (firstCount.get(firstOf(m)) ?? 0) + 1);
  const found = new Map<string, Member>();
  for (let at = text.indexOf("@"); at >= 0; at = text.indexOf("@", at + 1)) {
    for (const m of members) {
      const candidates = [m.email.toLowerCase(), m.name.trim().toLowerCase()];
      const first = firstOf(m);
      if (first && firstCount.get(first) === 1) candidates.push(first);
      if (
        candidates.some(
          (c) => c.length > 0 && text.startsWith(c, at + 1) && endsMention(text, at + 1 + c.length),
        )
      ) {
        found.set(m.id, m);
      }
    }
  }
  return [...found.values()];
}

export interface ThreadView {
  id: string;
  revisionId: string;
  revisionNumber: number;
  anchor: ThreadAnchor;
  severity: "blocking" | "advisory";
  status: "open" | "resolved";
  author: { id: string; name: string } | null;
  createdAt: string;
  resolvedAt: string | null;
  resolvedBy: { id: string; name: string } | null;
  comments: {
    id: string;
    author: { id: string; name: string } | null;
    body: string;
    mentions: { id: string; name: string }[];
    createdAt: string;
  }[];
  anchorPasses: boolean | null;
}

/** Threads with their comments; `anchorPasses` evaluated on `on` (the requested revision). */
export function threadViews(
  db: Db | DbOrTx,
  rows: readonly ThreadRow[],
  on: RevisionContext | null,
  given?: SpecResult | null,
): ThreadView[] {
  if (rows.length === 0) return [];
  const nominal = on ? (given ?? nominalOf(on)) : null;
  const mask = on ? maskOf(on.revision, on.program) : null;
  // Every comment of these threads in one query, oldest first within each thread.
  const byThread = new Map<string, (typeof comments.$inferSelect)[]>(rows.map((t) => [t.id, []]));
  for (const c of db
    .select()
    .from(comments)
    .where(inArray(comments.threadId, [...byThread.keys()]))
    .orderBy(asc(comments.createdAt), asc(comments.id))
    .all()) {
    byThread.get(c.threadId)?.push(c);
  }
  const ids: string[] = [];
  for (const t of rows) {
    ids.push(t.authorId);
    if (t.resolvedBy) ids.push(t.resolvedBy);
    for (const c of byThread.get(t.id) ?? []) ids.push(c.authorId, ...c.mentions);
  }
  const names = userNames(db, ids);
  return rows.map((t) => ({
    id: t.id,
    revisionId: t.revisionId,
    revisionNumber: t.revisionNumber,
    anchor: t.anchor,
    severity: t.severity,
    status: t.status,
    author: person(names, t.authorId),
    createdAt: t.createdAt.toISOString(),
    resolvedAt: t.resolvedAt ? t.resolvedAt.toISOString() : null,
    resolvedBy: person(names, t.resolvedBy),
    comments: (byThread.get(t.id) ?? []).map((c) => ({
      id: c.id,
      author: person(names, c.authorId),
      body: c.body,
      mentions: c.mentions
        .map((id) => person(names, id))
        .filter((p): p is { id: string; name: string } => p !== null),
      createdAt: c.createdAt.toISOString(),
    })),
    anchorPasses: nominal && mask ? anchorPasses(t.anchor, mask, nominal) : null,
  }));
}
