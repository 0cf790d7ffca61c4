import { queryOptions, useQuery } from "@tanstack/react-query";
import { GateSchema, type Deviation, type EvidenceFigures, type Gate } from "@stackproof/contracts";
import { api } from "../../../lib/api-client.ts";

export type { Deviation, EvidenceFigures, Gate };
export type GateCheck = Gate["checks"][number];
export const getGate = (revisionId: string) =>
  api.get(`/revisions/${encodeURIComponent(revisionId)}/gate`, { schema: GateSchema });

const running = (g: Gate | undefined) =>
  g?.evidence.run?.status === "queued" || g?.evidence.run?.status === "running";

/** The gate; polled every 1.5 s while its evidence run is still computing. */
export const gateQueryOptions = (revisionId: string) =>
  queryOptions({
    queryKey: ["revisions", revisionId, "gate"],
    queryFn: () => getGate(revisionId),
    refetchInterval: (q) => (running(q.state.data) ? 1500 : false),
  });

export const useGate = (revisionId: string) => useQuery(gateQueryOptions(revisionId));
