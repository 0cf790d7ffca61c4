import { queryOptions, useQuery } from "@tanstack/react-query";
import type { MaterialModel } from "@stackproof/optics";
import { api } from "../../../lib/api-client.ts";

export interface MaterialItem {
  id: string;
  name: string;
  role: "layer" | "substrate" | "medium" | "metal" | (string & {});
  source: string;
  builtIn: boolean;
  model: MaterialModel;
  createdAt?: string | null;
}

export const getMaterials = () => api.get<{ items: MaterialItem[] }>("/materials");

export const materialsQueryOptions = () =>
  queryOptions({ queryKey: ["materials", "library"], queryFn: getMaterials, staleTime: 60_000 });

export const useMaterials = () => useQuery(materialsQueryOptions());
