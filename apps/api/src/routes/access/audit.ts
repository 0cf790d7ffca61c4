// The audit log of the workspace, newest first.
import type { Router } from "express";
import { and, desc, eq } from "drizzle-orm";
import type { AppContext } from "../../context.ts";
import { auditLog, users } from "../../db/schema.ts";
import { getAuth } from "../../auth/guards.ts";
import { AuditListQuery, AuditListResponse } from "@stackproof/contracts";
import { keysetWhere, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";

export function auditRoutes(ctx: AppContext, router: Router): void {
  route(
    router,
    {
      method: "get",
      path: "/audit",
      summary: "Audit log, newest first; filter by subject or action",
      tag: "access",
      access: ["admin", "approver"],
      query: AuditListQuery,
      response: AuditListResponse,
    },
    ({ req, query }) => {
      const { workspaceId } = getAuth(req);
      const rows = ctx.db
        .select({ entry: auditLog, actorName: users.name })
        .from(auditLog)
        .leftJoin(users, eq(users.id, auditLog.actorId))
        .where(
          and(
            eq(auditLog.workspaceId, workspaceId),
            query.subjectType ? eq(auditLog.subjectType, query.subjectType) : undefined,
            query.subjectId ? eq(auditLog.subjectId, query.subjectId) : undefined,
            query.action ? eq(auditLog.action, query.action) : undefined,
            keysetWhere([auditLog.at, auditLog.id], query.cursor, "desc"),
          ),
        )
        .orderBy(desc(auditLog.at), desc(auditLog.id))
        .limit(query.limit + 1)
        .all();
      return toPage(
        rows,
        query.limit,
        (r) => [r.entry.at, r.entry.id],
        ({ entry, actorName }) => ({
          id: entry.id,
          at: entry.at.toISOString(),
          actor: entry.actorId ? { id: entry.actorId, name: actorName ?? "Former member" } : null,
          action: entry.action,
          subjectType: entry.subjectType,
          subjectId: entry.subjectId,
          summary: entry.summary,
          data: entry.data ?? null,
        }),
      );
    },
  );
}
