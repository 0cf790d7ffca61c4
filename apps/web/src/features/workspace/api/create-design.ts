import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { Design } from "@stackproof/optics";
import { api } from "../../../lib/api-client.ts";

export interface CreateDesignInput {
  programId: string;
  name: string;
  stack: Design;
  note: string;
}

/** Response of POST /programs/:id/designs: the design with its first revision. */
export interface CreatedDesign {
  id: string;
  name: string;
  revision?: { id: string };
  revisions?: { id: string }[];
  latestRevision?: { id: string };
}

export const createDesign = ({ programId, ...body }: CreateDesignInput) =>
  api.post<CreatedDesign>(`/programs/${programId}/designs`, body);

/** Id of the first revision in a create-design answer, whichever shape the server uses. */
export function firstRevisionId(d: CreatedDesign): string | undefined {
  return d.revision?.id ?? d.latestRevision?.id ?? d.revisions?.[0]?.id;
}

export function useCreateDesign() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createDesign,
    onSuccess: (_d, input) => qc.invalidateQueries({ queryKey: ["programs", input.programId] }),
  });
}
