import { queryOptions, useQuery } from "@tanstack/react-query";
import { HealthSchema, type Health } from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";

export type { Health };

export const getHealth = () => api.get("/api/health", { schema: HealthSchema });

export const healthQueryOptions = () =>
  queryOptions({ queryKey: ["health"], queryFn: getHealth, refetchInterval: 30_000, retry: false });

export const useHealth = () => useQuery(healthQueryOptions());
