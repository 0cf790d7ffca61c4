import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";

export type GateCheckId =
  "verified_yield" | "spec_deviation" | "blocking_threads" | "independent_approver" | "state";

export interface GateCheck {
  id: GateCheckId | (string & {});
  ok: boolean;
  message: string;
}

/** The evidence run's figures against the program's rules (null until the run is done). */
export interface EvidenceFigures {
  trials: number;
  passCount: number;
  yield: number;
  lowerBound: number;
  confidence: number;
  targetYield: number;
  minTrials: number;
  pass: boolean;
}

export interface Person {
  id: string;
  name: string;
}

export interface Deviation {
  id: string;
  revisionId: string;
  programVersion: number;
  bands: { id: string; change: string }[];
  reason: string;
  requestedBy: Person | null;
  requestedAt: string;
  status: "pending" | "accepted" | "rejected";
  decidedBy: Person | null;
  decidedAt: string | null;
  decisionNote: string;
}

export interface GateEvidence {
  programVersion: number;
  targetYield: number;
  confidence: number;
  minTrials: number;
  seed: string;
  seedRule: string;
  errorModelVersion: string;
  run: { id: string; status: string; trials: number; engineVersion: string } | null;
  figures: EvidenceFigures | null;
}

export interface Gate {
  checks: GateCheck[];
  canApprove: boolean;
  canRelease: boolean;
  yieldRunId?: string | null;
  evidence?: GateEvidence;
  deviation?: {
    required: boolean;
    accepted: boolean;
    bands: { id: string; change: string }[];
    current: Deviation | null;
  };
}

export const getGate = (revisionId: string) =>
  api.get<Gate>(`/revisions/${encodeURIComponent(revisionId)}/gate`);

const running = (g: Gate | undefined) =>
  g?.evidence?.run?.status === "queued" || g?.evidence?.run?.status === "running";

/** The gate; polled every 1.5 s while its evidence run is still computing. */
export const gateQueryOptions = (revisionId: string) =>
  queryOptions({
    queryKey: ["revisions", revisionId, "gate"],
    queryFn: () => getGate(revisionId),
    refetchInterval: (q) => (running(q.state.data) ? 1500 : false),
  });

export const useGate = (revisionId: string) => useQuery(gateQueryOptions(revisionId));
