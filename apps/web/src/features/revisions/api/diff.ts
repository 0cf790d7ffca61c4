import { queryOptions, useQuery } from "@tanstack/react-query";
import { RevisionDiffSchema, type RevisionDiff } from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";

export type { RevisionDiff };

export const diffQueryOptions = (revisionId: string, against: string) =>
  queryOptions({
    queryKey: ["revisions", revisionId, "diff", against],
    queryFn: () => api.get(`/revisions/${revisionId}/diff`, { query: { against }, schema: RevisionDiffSchema }),
    staleTime: Infinity,
  });

export const useRevisionDiff = (revisionId: string, against: string) => useQuery(diffQueryOptions(revisionId, against));
