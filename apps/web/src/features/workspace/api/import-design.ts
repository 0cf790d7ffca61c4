import { useMutation } from "@tanstack/react-query";
import { parseDesign } from "@stackproof/optics";
import { ImportDesignResponse } from "@stackproof/contracts";
import type { Design } from "@stackproof/optics";
import { api } from "../../../lib/api-client.ts";

export interface ImportedDesign {
  stack: Design;
  warnings: string[];
}

/** Sends a CSV or JSON design file to POST /imports/design; nothing is stored on the server. */
export async function importDesign(file: File): Promise<ImportedDesign> {
  const form = new FormData();
  form.append("file", file);
  const r = await api.post("/imports/design", form, { schema: ImportDesignResponse });
  return { stack: parseDesign(r.stack), warnings: r.warnings };
}

export const useImportDesign = () => useMutation({ mutationFn: importDesign });
