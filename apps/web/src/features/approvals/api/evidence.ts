import { useMutation, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { Deviation } from "./get-gate.ts";

/** Starts the revision's evidence run (server-assigned seed and trials), or returns the one that exists. */
export const startEvidenceRun = (revisionId: string) =>
  api.post<{ run: { id: string; status: string }; reused: boolean }>(
    `/revisions/${encodeURIComponent(revisionId)}/evidence-run`,
    {},
  );

export const requestDeviation = (revisionId: string, reason: string) =>
  api.post<Deviation>(`/revisions/${encodeURIComponent(revisionId)}/deviations`, { reason });

export const decideDeviation = (revisionId: string, deviationId: string, accept: boolean, note: string) =>
  api.post<Deviation>(
    `/revisions/${encodeURIComponent(revisionId)}/deviations/${encodeURIComponent(deviationId)}/decision`,
    { accept, note },
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
