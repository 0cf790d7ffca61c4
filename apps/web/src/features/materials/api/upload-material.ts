import { useMutation, useQueryClient } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { MaterialOutSchema } from "@stackproof/contracts";

export interface UploadMaterialInput {
  file: File;
  id: string;
  name: string;
  role: string;
  source?: string;
}

/** One problem the server found in an uploaded CSV (422 details). */
export interface CsvProblem {
  row?: number;
  column?: string | number;
  message: string;
}

export function uploadMaterial(input: UploadMaterialInput) {
  const form = new FormData();
  form.set("id", input.id);
  form.set("name", input.name);
  form.set("role", input.role);
  if (input.source) form.set("source", input.source);
  form.set("file", input.file);
  return api.post("/materials", form, { schema: MaterialOutSchema });
}

/** The row/column problems of a refused upload, if the server sent them. */
export function csvProblems(details: unknown): CsvProblem[] {
  if (!Array.isArray(details)) return [];
  return details
    .filter((d): d is Record<string, unknown> => typeof d === "object" && d !== null && "message" in d)
    .map((d) => ({
      row: typeof d.row === "number" ? d.row : undefined,
      column: typeof d.column === "string" || typeof d.column === "number" ? d.column : undefined,
      message: String(d.message),
    }));
}

export function useUploadMaterial() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: uploadMaterial,
    onSuccess: () => qc.invalidateQueries({ queryKey: ["materials"] }),
  });
}
