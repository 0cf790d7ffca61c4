import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import { DesignSchemaOut, type DesignDetail } from "@stackproof/contracts";

export const getDesign = (designId: string) => api.get(`/designs/${designId}`, { schema: DesignSchemaOut });

export const designQueryOptions = (designId: string) =>
  queryOptions({ queryKey: ["designs", designId], queryFn: () => getDesign(designId) });

export const useDesign = (designId: string) => useQuery(designQueryOptions(designId));

/** The newest revision of a design (highest number). */
export function latestRevision(design: DesignDetail) {
  return [...design.revisions].sort((a, b) => b.number - a.number)[0];
}
