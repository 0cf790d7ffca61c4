import { useMutation, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";

export type TransitionAction = "submit" | "request_changes" | "approve" | "release" | "withdraw";

export interface TransitionInput {
  action: TransitionAction;
  note?: string;
  yieldRunId?: string;
}

/** The server's answer: the revision after the move, the decision recorded, and the release filed (release only). */
export interface TransitionResult {
  revision: { id: string; status: string };
  decision: { id: string; action: TransitionAction };
  releaseId: string | null;
}

export const transitionRevision = (revisionId: string, input: TransitionInput) =>
  api.post<TransitionResult>(`/revisions/${encodeURIComponent(revisionId)}/transitions`, input);

/**
 * Moves a revision along the workflow. Afterwards everything that shows its state is refetched:
 * the revision (and its gate and decisions), its design, the overview, the queues and the release list.
 */
export function useTransitionRevision(revisionId: string, designId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: TransitionInput) => transitionRevision(revisionId, input),
    onSettled: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: ["revisions", revisionId] }),
        qc.invalidateQueries({ queryKey: ["designs", designId] }),
        qc.invalidateQueries({ queryKey: ["overview"] }),
        qc.invalidateQueries({ queryKey: ["queue"] }),
        qc.invalidateQueries({ queryKey: ["releases"] }),
        qc.invalidateQueries({ queryKey: ["audit"] }),
      ]),
  });
}
