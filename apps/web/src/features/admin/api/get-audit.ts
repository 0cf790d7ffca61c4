import { infiniteQueryOptions, useInfiniteQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { AuditListResponse, type AuditEntry } from "@stackproof/contracts";

export type { AuditEntry };

export const AUDIT_PAGE = 50;

export const getAudit = (cursor: string | null, action?: string) =>
  api.get("/audit", {
    schema: AuditListResponse,
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
