import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { ErrorModel, RevisionStatus, SpecMask, YieldEstimate } from "../../../lib/types.ts";

/** A design of the program, summarised like an overview row. */
export interface ProgramDesignRow {
  design: { id: string; name: string };
  latestRevision: {
    id: string;
    number: number;
    status: RevisionStatus;
    authorName: string;
    createdAt: string;
  } | null;
  latestVerifiedYield: YieldEstimate | null;
  openBlockingThreads: number;
  openThreads: number;
}

export interface Program {
  id: string;
  name: string;
  customer: string;
  description: string;
  application: string;
  protective: boolean;
  targetYield: number;
  minEvidenceTrials?: number;
  confidence?: number;
  /** Program version: every change of mask, error model, target, minimum trials or confidence makes a new one. */
  version?: number;
  specMask: SpecMask;
  errorModel: ErrorModel;
  studyDefaults: { trials: number; seed: string };
  createdAt: string;
}

export interface ProgramDetail extends Program {
  designs: ProgramDesignRow[];
}

export const getProgram = (id: string) => api.get<ProgramDetail>(`/programs/${encodeURIComponent(id)}`);

export const programQueryOptions = (id: string) =>
  queryOptions({ queryKey: ["programs", id], queryFn: () => getProgram(id) });

export const useProgram = (id: string) => useQuery(programQueryOptions(id));
