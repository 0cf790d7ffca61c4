// Review threads: anchors, the anchor verdict on a given revision, and @mentions.
import { and, asc, desc, eq, inArray, lte } from "drizzle-orm";
import { evaluateSpec, type SpecMask, type SpecResult } from "@stackproof/optics";
import type { Db } from "../db/client.ts";
import {
  comments,
  memberships,
  revisions,
  threads,
  users,
  type Role,
  type ThreadAnchor,
} from "../db/schema.ts";
import { recordAudit, type DbOrTx } from "../lib/audit.ts";
import { HttpError, conflict, forbidden } from "../lib/errors.ts";
import { newId } from "./canonical.ts";
import type { Actor, MailDeps } from "./deps.ts";
import {
  loadRevision,
  loadThread,
  maskOf,
  person,
  stackOf,
  userNames,
  type RevisionContext,
  type ThreadRow,
} from "./load.ts";
import { mailMention } from "./notify.ts";

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

// ---------------------------------------------------------------------------------------------------------------
// Writing: opening, commenting, resolving and reopening. Each is one transaction with its audit entry; members
// @mentioned get an e-mail once it is committed.

/**
 * Stores a thread on a revision as of `at`, open or (with `resolved`) already resolved; its comments are stored
 * with storeComment. Returns its id. openThread is the product's way in; the demo seeder back-dates its threads.
 */
export function storeThread(
  db: DbOrTx,
  input: {
    rc: RevisionContext;
    anchor: ThreadAnchor;
    severity: "blocking" | "advisory";
    authorId: string;
    at?: Date;
    resolved?: { by: string; at: Date };
  },
): string {
  const { rc } = input;
  const id = newId();
  db.insert(threads)
    .values({
      id,
      designId: rc.design.id,
      revisionId: rc.revision.id,
      revisionNumber: rc.revision.number,
      anchor: input.anchor,
      severity: input.severity,
      status: input.resolved ? "resolved" : "open",
      authorId: input.authorId,
      resolvedBy: input.resolved?.by ?? null,
      resolvedAt: input.resolved?.at ?? null,
      createdAt: input.at ?? new Date(),
    })
    .run();
  return id;
}

/** Stores a comment on a thread as of `at`, with the ids of the members it mentions. */
export function storeComment(
  db: DbOrTx,
  input: { threadId: string; authorId: string; body: string; mentions: string[]; at?: Date },
): void {
  db.insert(comments)
    .values({
      id: newId(),
      threadId: input.threadId,
      authorId: input.authorId,
      body: input.body,
      mentions: input.mentions,
      createdAt: input.at ?? new Date(),
    })
    .run();
}

function addComment(db: DbOrTx, workspaceId: string, actor: Actor, threadId: string, body: string) {
  const members = workspaceMembers(db, workspaceId);
  const mentioned = findMentions(body, members).filter((m) => m.id !== actor.id);
  storeComment(db, { threadId, authorId: actor.id, body, mentions: mentioned.map((m) => m.id) });
  return mentioned;
}

function threadRow(db: DbOrTx, id: string): ThreadRow | undefined {
  return db.select().from(threads).where(eq(threads.id, id)).get();
}

/**
 * Opens a thread on a revision with its first comment. 422 unknown_anchor when the anchor names a spec band or a
 * layer the revision does not have. Returns the stored thread.
 */
export function openThread(
  deps: MailDeps,
  input: {
    workspaceId: string;
    actor: Actor;
    rc: RevisionContext;
    anchor: ThreadAnchor;
    severity: "blocking" | "advisory";
    body: string;
  },
): ThreadRow | undefined {
  const { workspaceId, actor, rc, anchor } = input;
  const mask = maskOf(rc.revision, rc.program);
  // a band or a colour requirement (they share ids)
  if (
    anchor.kind === "band" &&
    ![...mask.bands, ...(mask.colour ?? [])].some((b) => b.id === anchor.bandId)
  ) {
    throw new HttpError(
      422,
      "unknown_anchor",
      `Revision ${rc.revision.number} has no spec band "${anchor.bandId}".`,
    );
  }
  if (anchor.kind === "layer" && anchor.index >= stackOf(rc.revision).layers.length) {
    throw new HttpError(
      422,
      "unknown_anchor",
      `Revision ${rc.revision.number} has ${stackOf(rc.revision).layers.length} layers; there is no layer ${anchor.index}.`,
    );
  }
  const { id, mentioned } = deps.db.transaction((tx) => {
    const id = storeThread(tx, { rc, anchor, severity: input.severity, authorId: actor.id });
    const mentioned = addComment(tx, workspaceId, actor, id, input.body);
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "thread.opened",
      subjectType: "thread",
      subjectId: id,
      summary: `${actor.name} opened a ${input.severity} thread on ${rc.design.name} rev ${rc.revision.number}`,
    });
    return { id, mentioned };
  });
  for (const m of mentioned) mailMention(deps, rc, m, actor.name, input.body);
  return threadRow(deps.db, id);
}

/**
 * Comments on a thread (403 for a member holding only the admin role: admins do not take part in reviews).
 * Returns the thread and the revision it was opened on.
 */
export function commentOnThread(
  deps: MailDeps,
  input: { workspaceId: string; actor: Actor & { roles: readonly Role[] }; threadId: string; body: string },
): { thread: ThreadRow | undefined; rc: RevisionContext } {
  const { workspaceId, actor } = input;
  if (!actor.roles.some((r) => r !== "admin"))
    throw forbidden("Commenting needs a designer, reviewer or approver role.");
  const { thread } = loadThread(deps.db, workspaceId, input.threadId);
  const rc = loadRevision(deps.db, workspaceId, thread.revisionId);
  const mentioned = deps.db.transaction((tx) => {
    const mentioned = addComment(tx, workspaceId, actor, thread.id, input.body);
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "thread.commented",
      subjectType: "thread",
      subjectId: thread.id,
      summary: `${actor.name} commented on a thread of ${rc.design.name}`,
    });
    return mentioned;
  });
  for (const m of mentioned) mailMention(deps, rc, m, actor.name, input.body);
  return { thread: threadRow(deps.db, thread.id), rc };
}

/**
 * Resolves or reopens a thread, with an optional note as a comment. Only a reviewer, an approver or the thread's
 * author may (403); a thread already in that state is 409. Returns the thread and the design's latest revision
 * (where the thread now matters).
 */
export function setThreadStatus(
  deps: MailDeps,
  input: {
    workspaceId: string;
    actor: Actor & { roles: readonly Role[] };
    threadId: string;
    action: "resolve" | "reopen";
    note?: string | undefined;
  },
): { thread: ThreadRow | undefined; rc: RevisionContext } {
  const { workspaceId, actor, action } = input;
  const { thread } = loadThread(deps.db, workspaceId, input.threadId);
  if (
    thread.authorId !== actor.id &&
    !actor.roles.includes("reviewer") &&
    !actor.roles.includes("approver")
  ) {
    throw forbidden(`Only a reviewer, an approver or the thread's author may ${action} it.`);
  }
  const rc = loadRevision(deps.db, workspaceId, thread.revisionId);
  const from = action === "resolve" ? "open" : "resolved";
  const to = action === "resolve" ? "resolved" : "open";
  const mentioned = deps.db.transaction((tx) => {
    const res = tx
      .update(threads)
      .set(
        to === "resolved"
          ? { status: to, resolvedAt: new Date(), resolvedBy: actor.id }
          : { status: to, resolvedAt: null, resolvedBy: null },
      )
      .where(and(eq(threads.id, thread.id), eq(threads.status, from)))
      .run();
    if (res.changes !== 1) throw conflict(`The thread is already ${to}.`);
    const mentioned = input.note ? addComment(tx, workspaceId, actor, thread.id, input.note) : [];
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: action === "resolve" ? "thread.resolved" : "thread.reopened",
      subjectType: "thread",
      subjectId: thread.id,
      summary: `${actor.name} ${action === "resolve" ? "resolved" : "reopened"} a ${thread.severity} thread on ${rc.design.name}`,
    });
    return mentioned;
  });
  for (const m of mentioned) mailMention(deps, rc, m, actor.name, input.note ?? "");
  const latest = deps.db
    .select()
    .from(revisions)
    .where(eq(revisions.designId, thread.designId))
    .orderBy(desc(revisions.number))
    .get();
  return { thread: threadRow(deps.db, thread.id), rc: latest ? { ...rc, revision: latest } : rc };
}
