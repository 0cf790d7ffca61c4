import { useMutation, useQueryClient } from "@tanstack/react-query";
import {
  TransitionResponse,
  type TransitionAction,
  type TransitionInput,
  type TransitionResult,
} from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";

export type { TransitionAction, TransitionInput, TransitionResult };

export const transitionRevision = (revisionId: string, input: TransitionInput) =>
  api.post(`/revisions/${encodeURIComponent(revisionId)}/transitions`, input, { schema: TransitionResponse });

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
