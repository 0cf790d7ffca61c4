import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";

export interface Health {
  status: "ok" | "degraded";
  version: string;
  engineVersion: string;
  database: "ok" | "error";
  migrations: { applied: number; available: number; upToDate: boolean };
}

export const getHealth = () => api.get<Health>("/api/health");

export const healthQueryOptions = () =>
  queryOptions({ queryKey: ["health"], queryFn: getHealth, refetchInterval: 30_000, retry: false });

export const useHealth = () => useQuery(healthQueryOptions());
