import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { OutboxDetail, type OutboxMessage } from "@stackproof/contracts";

export type { OutboxMessage };

export const getOutboxMessage = (id: string) => api.get(`/outbox/${encodeURIComponent(id)}`, { schema: OutboxDetail });

export const outboxMessageQueryOptions = (id: string) =>
  queryOptions({
    queryKey: ["outbox", "message", id],
    queryFn: () => getOutboxMessage(id),
    staleTime: Infinity,
  });

export const useOutboxMessage = (id: string | null) =>
  useQuery({ ...outboxMessageQueryOptions(id ?? ""), enabled: id !== null });
