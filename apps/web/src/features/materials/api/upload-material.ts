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

export function uploadMaterial(input: UploadMaterialInput) {
  const form = new FormData();
  form.set("id", input.id);
  form.set("name", input.name);
  form.set("role", input.role);
  if (input.source) form.set("source", input.source);
  form.set("file", input.file);
  return api.post("/materials", form, { schema: MaterialOutSchema });
}

export function useUploadMaterial() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: uploadMaterial,
    onSuccess: () => qc.invalidateQueries({ queryKey: ["materials"] }),
  });
}
