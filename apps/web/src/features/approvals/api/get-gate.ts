import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";

export type GateCheckId = "verified_yield" | "blocking_threads" | "independent_approver" | "state";

export interface GateCheck {
  id: GateCheckId | (string & {});
  ok: boolean;
  message: string;
}

export interface Gate {
  checks: GateCheck[];
  canApprove: boolean;
  canRelease: boolean;
}

export const getGate = (revisionId: string) =>
  api.get<Gate>(`/revisions/${encodeURIComponent(revisionId)}/gate`);

export const gateQueryOptions = (revisionId: string) =>
  queryOptions({ queryKey: ["revisions", revisionId, "gate"], queryFn: () => getGate(revisionId) });

export const useGate = (revisionId: string) => useQuery(gateQueryOptions(revisionId));
