import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { OutboxListResponse, type OutboxItem } from "@stackproof/contracts";

export type { OutboxItem };

export const getOutbox = (cursor?: string) =>
  api.get("/outbox", { query: { limit: 50, cursor }, schema: OutboxListResponse });

export const outboxQueryOptions = (cursor?: string) =>
  queryOptions({
    queryKey: ["outbox", { cursor: cursor ?? null }],
    queryFn: () => getOutbox(cursor),
    retry: false,
  });

export const useOutbox = (cursor?: string) => useQuery(outboxQueryOptions(cursor));

/** Whether this server captures mail (GET /outbox answers; a real SMTP host makes it 404). */
export const outboxAvailableQueryOptions = () =>
  queryOptions({
    queryKey: ["outbox", "available"],
    queryFn: async () => {
      try {
        await api.get("/outbox", { query: { limit: 1 }, schema: OutboxListResponse });
        return true;
      } catch {
        return false;
      }
    },
    staleTime: 5 * 60_000,
    retry: false,
  });

export const useOutboxAvailable = () => useQuery(outboxAvailableQueryOptions()).data ?? false;
