import { useMutation, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { ErrorModel, SpecMask } from "../../../lib/types.ts";
import type { Program } from "./get-program.ts";

/** The body of POST /programs; PATCH /programs/:id takes any subset of it. `targetYield` is a fraction 0..1. */
export interface ProgramBody {
  name: string;
  customer: string;
  description: string;
  application: string;
  protective: boolean;
  targetYield: number;
  /** Evidence rules: minimum trials of the evidence run and the confidence of the Wilson bound (fraction). */
  minEvidenceTrials: number;
  confidence: number;
  specMask: SpecMask;
  errorModel: ErrorModel;
  studyDefaults: { trials: number; seed: string };
}

export const createProgram = (body: ProgramBody) => api.post<Program>("/programs", body);

export const updateProgram = (id: string, body: Partial<ProgramBody>) =>
  api.patch<Program>(`/programs/${encodeURIComponent(id)}`, body);

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
