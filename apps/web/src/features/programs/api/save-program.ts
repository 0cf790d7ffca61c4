import { useMutation, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { ProgramSchema, type ProgramBody } from "@stackproof/contracts";

export type { ProgramBody };

export const createProgram = (body: ProgramBody) => api.post("/programs", body, { schema: ProgramSchema });

export const updateProgram = (id: string, body: Partial<ProgramBody>) =>
  api.patch(`/programs/${encodeURIComponent(id)}`, body, { schema: ProgramSchema });

export function useCreateProgram() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createProgram,
    onSuccess: () => qc.invalidateQueries({ queryKey: ["programs"] }),
  });
}

export function useUpdateProgram(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: Partial<ProgramBody>) => updateProgram(id, body),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: ["programs"] });
      // The overview rows carry the program's target and protective flag.
      await qc.invalidateQueries({ queryKey: ["overview"] });
    },
  });
}
