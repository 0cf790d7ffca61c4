import { queryOptions, useQuery } from "@tanstack/react-query";
import { GateSchema, type Gate } from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";

export type { Gate };
export type GateCheck = Gate["checks"][number];
export const getGate = (revisionId: string) =>
  api.get(`/revisions/${encodeURIComponent(revisionId)}/gate`, { schema: GateSchema });

export const gateQueryOptions = (revisionId: string) =>
  queryOptions({ queryKey: ["revisions", revisionId, "gate"], queryFn: () => getGate(revisionId) });

export const useGate = (revisionId: string) => useQuery(gateQueryOptions(revisionId));
