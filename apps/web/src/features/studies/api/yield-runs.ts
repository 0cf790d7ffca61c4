import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import {
  CreateYieldRunResponse,
  YieldRunListResponse,
  YieldRunSchema,
  type YieldRun,
  type YieldRunInput,
  type YieldRunStatus,
} from "@stackproof/contracts";
import type { YieldResult } from "@stackproof/optics";
import { api } from "../../../lib/api-client.ts";

export type { YieldRun, YieldRunStatus };

/**
 * The request body (contract YieldRunBody) and the revision it is for. The browser sends its whole YieldResult;
 * the contract's ClientResultSchema names the fields the server compares and keeps the rest.
 */
export type CreateYieldRunInput = Omit<YieldRunInput, "clientResult"> & {
  revisionId: string;
  clientResult?: YieldResult;
};

export const createYieldRun = ({ revisionId, ...body }: CreateYieldRunInput) =>
  api
    .post(`/revisions/${revisionId}/yield-runs`, body, { schema: CreateYieldRunResponse })
    .then((r) => r.run);

export function useCreateYieldRun() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createYieldRun,
    onSuccess: (run) => qc.invalidateQueries({ queryKey: ["revisions", run.revisionId, "yield-runs"] }),
  });
}

export const getYieldRun = (runId: string) => api.get(`/yield-runs/${runId}`, { schema: YieldRunSchema });

const finished = (s: YieldRunStatus | undefined) => s === "done" || s === "failed" || s === "cancelled";

/** One run, polled every second until it finishes. */
export const yieldRunQueryOptions = (runId: string) =>
  queryOptions({
    queryKey: ["yield-runs", runId],
    queryFn: () => getYieldRun(runId),
    refetchInterval: (q) => (finished(q.state.data?.status) ? false : 1000),
  });

export const useYieldRun = (runId: string | null) =>
  useQuery({ ...yieldRunQueryOptions(runId ?? ""), enabled: Boolean(runId) });

export const revisionYieldRunsQueryOptions = (revisionId: string) =>
  queryOptions({
    queryKey: ["revisions", revisionId, "yield-runs"],
    queryFn: () =>
      api.get(`/revisions/${revisionId}/yield-runs`, { schema: YieldRunListResponse }).then((r) => r.items),
  });

export const useRevisionYieldRuns = (revisionId: string) =>
  useQuery(revisionYieldRunsQueryOptions(revisionId));

export const cancelYieldRun = (runId: string) =>
  api.post(`/yield-runs/${runId}/cancel`, undefined, { schema: YieldRunSchema });
