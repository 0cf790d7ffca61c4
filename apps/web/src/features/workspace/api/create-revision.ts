import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { Design, SpecMask } from "@stackproof/optics";
import { api } from "../../../lib/api-client.ts";
import { RevisionSchema } from "@stackproof/contracts";

export interface CreateRevisionInput {
  designId: string;
  stack: Design;
  note: string;
  specMask?: SpecMask;
}

export const createRevision = ({ designId, ...body }: CreateRevisionInput) =>
  api.post(`/designs/${designId}/revisions`, body, { schema: RevisionSchema });

export function useCreateRevision() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createRevision,
    onSuccess: (_r, input) => qc.invalidateQueries({ queryKey: ["designs", input.designId] }),
  });
}
