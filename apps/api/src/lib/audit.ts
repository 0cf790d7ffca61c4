// The audit log: one row per state change, written in the same transaction as the change.
import type { Db } from "../db/client.ts";
import { auditLog } from "../db/schema.ts";
import { newId } from "../auth/tokens.ts";

/** The database or a drizzle transaction opened on it (`db.transaction((tx) => ...)`). */
export type DbOrTx = Db | Parameters<Parameters<Db["transaction"]>[0]>[0];

export interface AuditEntry {
  workspaceId: string;
  /** The member who made the change; null for the system (demo data, background jobs). */
  actorId: string | null;
  /** Dotted verb, e.g. "invitation.created", "member.roles_changed", "revision.approved". */
  action: string;
  /** Kind of thing changed, e.g. "invitation", "member", "revision". */
  subjectType: string;
  subjectId: string;
  /** One human sentence shown on the audit page. */
  summary: string;
  /** Extra JSON for the record (before/after values, ids). */
  data?: unknown;
}

/** Inserts an audit row synchronously (better-sqlite3), so it can run inside `db.transaction(...)`. Returns its id. */
export function recordAudit(db: DbOrTx, entry: AuditEntry): string {
  const id = newId();
  db.insert(auditLog)
    .values({
      id,
      workspaceId: entry.workspaceId,
      actorId: entry.actorId,
      action: entry.action,
      subjectType: entry.subjectType,
      subjectId: entry.subjectId,
      summary: entry.summary,
      data: entry.data ?? null,
      at: new Date(),
    })
    .run();
  return id;
}
