import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { ReleaseListResponse, type ReleaseSummary } from "@stackproof/contracts";

export type { ReleaseSummary };

export const getReleases = () => api.get("/releases", { query: { limit: 200 }, schema: ReleaseListResponse });

export const releasesQueryOptions = () =>
  queryOptions({ queryKey: ["releases", "list"], queryFn: getReleases });

export const useReleases = (enabled = true) => useQuery({ ...releasesQueryOptions(), enabled });
