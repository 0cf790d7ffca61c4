import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { RevisionSummary } from "../../../lib/types.ts";

export interface Queue {
  changesRequested: RevisionSummary[];
  reviewRequested: RevisionSummary[];
  readyForDecision: RevisionSummary[];
  readyForRelease: RevisionSummary[];
}

export const getQueue = () => api.get<Queue>("/queue");

export const queueQueryOptions = () => queryOptions({ queryKey: ["queue"], queryFn: getQueue });

export const useQueue = () => useQuery(queueQueryOptions());
