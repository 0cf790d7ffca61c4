import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { MaterialOption } from "../lib/materials.ts";

export const getMaterials = () => api.get<{ items: MaterialOption[] }>("/materials").then((r) => r.items);

export const materialsQueryOptions = () =>
  queryOptions({ queryKey: ["materials"], queryFn: getMaterials, staleTime: 5 * 60_000 });

export const useMaterials = () => useQuery(materialsQueryOptions());
