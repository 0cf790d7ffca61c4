import { useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { ReleaseListResponse } from "@stackproof/contracts";

/** The release record filed for a revision, if any (looked up in GET /releases; same cache entry as the release list). */
export function useRevisionRelease(revisionId: string, enabled: boolean) {
  return useQuery({
    queryKey: ["releases", "list"],
    queryFn: () => api.get("/releases", { query: { limit: 200 }, schema: ReleaseListResponse }),
    enabled,
    select: (page) => page.items.find((r) => r.revision.id === revisionId) ?? null,
  });
}
