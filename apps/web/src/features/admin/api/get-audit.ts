import { infiniteQueryOptions, useInfiniteQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { PersonRef, Page } from "../../../lib/types.ts";

export interface AuditEntry {
  id: string;
  at: string;
  actor: PersonRef | null;
  action: string;
  subjectType: string;
  subjectId: string;
  summary: string;
}

export const AUDIT_PAGE = 50;

export const getAudit = (cursor: string | null, action?: string) =>
  api.get<Page<AuditEntry>>("/audit", {
    query: { limit: AUDIT_PAGE, cursor: cursor ?? undefined, action: action || undefined },
  });

export const auditQueryOptions = (action?: string) =>
  infiniteQueryOptions({
    queryKey: ["audit", { action: action ?? "" }],
    queryFn: ({ pageParam }) => getAudit(pageParam, action),
    initialPageParam: null as string | null,
    getNextPageParam: (last) => last.nextCursor,
  });

export const useAudit = (action?: string) => useInfiniteQuery(auditQueryOptions(action));
