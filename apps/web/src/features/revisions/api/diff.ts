import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Layer } from "@stackproof/optics";
import { api } from "../../../lib/api-client.ts";

export interface RevisionDiff {
  added: { index: number; layer?: Layer; material?: string; thickness?: number }[];
  removed: { index: number; layer?: Layer; material?: string; thickness?: number }[];
  changed: { index: number; before: Partial<Layer> | number; after: Partial<Layer> | number; deltaNm: number }[];
  summary: string | Record<string, unknown>;
}

export const diffQueryOptions = (revisionId: string, against: string) =>
  queryOptions({
    queryKey: ["revisions", revisionId, "diff", against],
    queryFn: () => api.get<RevisionDiff>(`/revisions/${revisionId}/diff`, { query: { against } }),
    staleTime: Infinity,
  });

export const useRevisionDiff = (revisionId: string, against: string) => useQuery(diffQueryOptions(revisionId, against));
