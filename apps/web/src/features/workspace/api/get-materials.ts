import { queryOptions, useQuery } from "@tanstack/react-query";
import { MaterialListResponse } from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";
import type { MaterialOption } from "../lib/materials.ts";

export const getMaterials = () => api.get("/materials", { schema: MaterialListResponse }).then((r): MaterialOption[] => r.items);

export const materialsQueryOptions = () =>
  queryOptions({ queryKey: ["materials"], queryFn: getMaterials, staleTime: 5 * 60_000 });

export const useMaterials = () => useQuery(materialsQueryOptions());
