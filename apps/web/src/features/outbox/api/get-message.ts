import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { OutboxItem } from "./get-outbox.ts";

export interface OutboxMessage extends OutboxItem {
  from: string;
  text: string;
  html: string | null;
}

export const getOutboxMessage = (id: string) => api.get<OutboxMessage>(`/outbox/${encodeURIComponent(id)}`);

export const outboxMessageQueryOptions = (id: string) =>
  queryOptions({
    queryKey: ["outbox", "message", id],
    queryFn: () => getOutboxMessage(id),
    staleTime: Infinity,
  });

export const useOutboxMessage = (id: string | null) =>
  useQuery({ ...outboxMessageQueryOptions(id ?? ""), enabled: id !== null });
