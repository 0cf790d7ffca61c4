import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { Design } from "@stackproof/optics";
import { CreateDesignResponse } from "@stackproof/contracts";
import type { z } from "zod";
import { api } from "../../../lib/api-client.ts";

export interface CreateDesignInput {
  programId: string;
  name: string;
  stack: Design;
  note: string;
}

/** Response of POST /programs/:id/designs: the design with its first revision. */
export type CreatedDesign = z.infer<typeof CreateDesignResponse>;

export const createDesign = ({ programId, ...body }: CreateDesignInput) =>
  api.post(`/programs/${programId}/designs`, body, { schema: CreateDesignResponse });

/** Id of the first revision in a create-design answer. */
export function firstRevisionId(d: CreatedDesign): string {
  return d.revision.id;
}

export function useCreateDesign() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createDesign,
    onSuccess: (_d, input) => qc.invalidateQueries({ queryKey: ["programs", input.programId] }),
  });
}
