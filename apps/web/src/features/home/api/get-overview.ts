import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { RevisionStatus, YieldEstimate } from "../../../lib/types.ts";

export interface OverviewRow {
  design: { id: string; name: string };
  program: { id: string; name: string; targetYield: number; protective: boolean };
  latestRevision: {
    id: string;
    number: number;
    status: RevisionStatus;
    authorName: string;
    createdAt: string;
  };
  latestVerifiedYield: YieldEstimate | null;
  openBlockingThreads: number;
  openThreads: number;
}

export const getOverview = () => api.get<{ items: OverviewRow[] }>("/overview");

export const overviewQueryOptions = () => queryOptions({ queryKey: ["overview"], queryFn: getOverview });

export const useOverview = () => useQuery(overviewQueryOptions());
