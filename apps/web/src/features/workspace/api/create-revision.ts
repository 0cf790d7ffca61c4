import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { Design, SpecMask } from "@stackproof/optics";
import { api, ApiError } from "../../../lib/api-client.ts";
import { RevisionSchema, StaleBaseDetails, type StaleBase } from "@stackproof/contracts";

export type { StaleBase };

export interface CreateRevisionInput {
  designId: string;
  /** The revision the edits start from; the server answers 409 stale_base when it is not the design's latest. */
  baseRevisionId: string | null;
  stack: Design;
  note: string;
  specMask?: SpecMask;
}

export const createRevision = ({ designId, ...body }: CreateRevisionInput) =>
  api.post(`/designs/${designId}/revisions`, body, { schema: RevisionSchema });

/** The two revisions of a 409 stale_base answer (someone saved first), or null for any other error. */
export function staleBaseOf(error: unknown): StaleBase | null {
  if (!(error instanceof ApiError) || error.status !== 409 || error.code !== "stale_base") return null;
  const parsed = StaleBaseDetails.safeParse(error.details);
  return parsed.success ? parsed.data : null;
}

export function useCreateRevision() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createRevision,
    onSuccess: (_r, input) => qc.invalidateQueries({ queryKey: ["designs", input.designId] }),
    // A stale base means the design has a newer revision: refresh the history so it shows.
    onError: (error, input) => {
      if (staleBaseOf(error)) void qc.invalidateQueries({ queryKey: ["designs", input.designId] });
    },
  });
}
