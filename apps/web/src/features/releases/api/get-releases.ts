import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { Page, PersonRef } from "../../../lib/types.ts";

/** A row of GET /releases (newest first). */
export interface ReleaseSummary {
  id: string;
  releasedAt: string;
  releasedBy: PersonRef;
  status: string;
  program: { id: string; name: string; protective: boolean };
  design: { id: string; name: string };
  revision: { id: string; number: number; hash: string };
  yield: { yield: number; low: number; high: number; trials: number } | null;
}

export const getReleases = () => api.get<Page<ReleaseSummary>>("/releases", { query: { limit: 200 } });

export const releasesQueryOptions = () =>
  queryOptions({ queryKey: ["releases", "list"], queryFn: getReleases });

export const useReleases = (enabled = true) => useQuery({ ...releasesQueryOptions(), enabled });
