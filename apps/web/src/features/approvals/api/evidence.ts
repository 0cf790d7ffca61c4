import { useMutation, useQueryClient } from "@tanstack/react-query";
import { CreateYieldRunResponse, DeviationSchema } from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";

/** Starts the revision's evidence run (server-assigned seed and trials), or returns the one that exists. */
export const startEvidenceRun = (revisionId: string) =>
  api.post(`/revisions/${encodeURIComponent(revisionId)}/evidence-run`, {}, { schema: CreateYieldRunResponse });

export const requestDeviation = (revisionId: string, reason: string) =>
  api.post(`/revisions/${encodeURIComponent(revisionId)}/deviations`, { reason }, { schema: DeviationSchema });

export const decideDeviation = (revisionId: string, deviationId: string, accept: boolean, note: string) =>
  api.post(
    `/revisions/${encodeURIComponent(revisionId)}/deviations/${encodeURIComponent(deviationId)}/decision`,
    { accept, note },
    { schema: DeviationSchema },
  );

function useRefreshGate(revisionId: string) {
  const qc = useQueryClient();
  return () =>
    Promise.all([
      qc.invalidateQueries({ queryKey: ["revisions", revisionId] }),
      qc.invalidateQueries({ queryKey: ["overview"] }),
      qc.invalidateQueries({ queryKey: ["queue"] }),
    ]);
}

export function useStartEvidenceRun(revisionId: string) {
  const refresh = useRefreshGate(revisionId);
  return useMutation({ mutationFn: () => startEvidenceRun(revisionId), onSettled: refresh });
}

export function useRequestDeviation(revisionId: string) {
  const refresh = useRefreshGate(revisionId);
  return useMutation({
    mutationFn: (reason: string) => requestDeviation(revisionId, reason),
    onSettled: refresh,
  });
}

export function useDecideDeviation(revisionId: string) {
  const refresh = useRefreshGate(revisionId);
  return useMutation({
    mutationFn: (v: { deviationId: string; accept: boolean; note: string }) =>
      decideDeviation(revisionId, v.deviationId, v.accept, v.note),
    onSettled: refresh,
  });
}
