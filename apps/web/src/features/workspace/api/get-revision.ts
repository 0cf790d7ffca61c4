import { queryOptions, useQuery } from "@tanstack/react-query";
import { parseDesign } from "@stackproof/optics";
import { api } from "../../../lib/api-client.ts";
import { RevisionSchema, type Revision } from "@stackproof/contracts";

export async function getRevision(revisionId: string): Promise<Revision> {
  const r = await api.get(`/revisions/${revisionId}`, { schema: RevisionSchema });
  // Apply the format's defaults (incident/exit) so the editor starts from a complete design.
  return { ...r, stack: parseDesign(r.stack) };
}

export const revisionQueryOptions = (revisionId: string) =>
  // A revision is immutable: once fetched it never goes stale (its status is read from the design list).
  queryOptions({ queryKey: ["revisions", revisionId], queryFn: () => getRevision(revisionId), staleTime: 60_000 });

export const useRevision = (revisionId: string) => useQuery(revisionQueryOptions(revisionId));
