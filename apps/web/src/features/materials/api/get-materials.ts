import { queryOptions, useQuery } from "@tanstack/react-query";
import { MaterialListResponse, type MaterialItem } from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";

export type { MaterialItem };

export const getMaterials = () => api.get("/materials", { schema: MaterialListResponse });

export const materialsQueryOptions = () =>
  queryOptions({ queryKey: ["materials", "library"], queryFn: getMaterials, staleTime: 60_000 });

export const useMaterials = () => useQuery(materialsQueryOptions());
