import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { ErrorModel, YieldResult } from "@stackproof/optics";
import { api } from "../../../lib/api-client.ts";

export type YieldRunStatus = "queued" | "running" | "done" | "failed" | "cancelled";

export interface YieldRun {
  id: string;
  revisionId: string;
  status: YieldRunStatus;
  progress: { done: number; total: number };
  trials: number;
  seed: string;
  errorModel: ErrorModel;
  result: YieldResult | null;
  verified: boolean | null;
  mismatch?: string;
  engineVersion: string;
  error?: string;
  createdAt: string;
  finishedAt: string | null;
}

export interface CreateYieldRunInput {
  revisionId: string;
  trials: number;
  seed: string;
  errorModel?: ErrorModel;
  clientResult?: YieldResult;
}

export const createYieldRun = ({ revisionId, ...body }: CreateYieldRunInput) =>
  api.post<{ run: YieldRun } | YieldRun>(`/revisions/${revisionId}/yield-runs`, body).then((r) => ("run" in r ? r.run : r));

export function useCreateYieldRun() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createYieldRun,
    onSuccess: (run) => qc.invalidateQueries({ queryKey: ["revisions", run.revisionId, "yield-runs"] }),
  });
}

export const getYieldRun = (runId: string) => api.get<YieldRun>(`/yield-runs/${runId}`);

const finished = (s: YieldRunStatus | undefined) => s === "done" || s === "failed" || s === "cancelled";

/** One run, polled every second until it finishes. */
export const yieldRunQueryOptions = (runId: string) =>
  queryOptions({
    queryKey: ["yield-runs", runId],
    queryFn: () => getYieldRun(runId),
    refetchInterval: (q) => (finished(q.state.data?.status) ? false : 1000),
  });

export const useYieldRun = (runId: string | null) => useQuery({ ...yieldRunQueryOptions(runId ?? ""), enabled: Boolean(runId) });

export const revisionYieldRunsQueryOptions = (revisionId: string) =>
  queryOptions({
    queryKey: ["revisions", revisionId, "yield-runs"],
    queryFn: () => api.get<{ items: YieldRun[] }>(`/revisions/${revisionId}/yield-runs`).then((r) => r.items),
  });

export const useRevisionYieldRuns = (revisionId: string) => useQuery(revisionYieldRunsQueryOptions(revisionId));

export const cancelYieldRun = (runId: string) => api.post<unknown>(`/yield-runs/${runId}/cancel`);
