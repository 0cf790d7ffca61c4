import { useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { Page } from "../../../lib/types.ts";

interface ReleaseRow {
  id: string;
  revision: { id: string };
}

/** The release record filed for a revision, if any (looked up in GET /releases; same cache entry as the release list). */
export function useRevisionRelease(revisionId: string, enabled: boolean) {
  return useQuery({
    queryKey: ["releases", "list"],
    queryFn: () => api.get<Page<ReleaseRow>>("/releases", { query: { limit: 200 } }),
    enabled,
    select: (page) => page.items.find((r) => r.revision.id === revisionId) ?? null,
  });
}
