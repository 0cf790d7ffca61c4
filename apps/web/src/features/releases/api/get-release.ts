import { queryOptions, useQuery } from "@tanstack/react-query";
import { api } from "../../../lib/api-client.ts";
import type { ErrorModel, PersonRef, RevisionStatus, SpecMask } from "../../../lib/types.ts";

export interface StackLayer {
  material: string;
  thickness: number;
  label?: string;
  locked?: boolean;
}

export interface StackDesign {
  format?: string;
  name?: string;
  referenceWavelength?: number;
  incident?: string;
  layers: StackLayer[];
  substrate?: { material: string; thicknessMm?: number; backside?: boolean };
  exit?: string;
}

export interface BandOutcome {
  id: string;
  pass: boolean;
  worst?: { wavelength: number; value: number };
  margin: number;
  average?: number;
}

export interface Decision {
  id: string;
  action: "submit" | "request_changes" | "approve" | "release" | "withdraw" | "return_to_review";
  fromStatus?: RevisionStatus;
  toStatus?: RevisionStatus;
  actor: PersonRef;
  at: string;
  revisionHash: string;
  yieldRunId: string | null;
  programVersion?: number | null;
  note: string;
}

/** Nominal curve and the evidence run's 5–95 % envelope at one (quantity, polarization, angle); nulls where not finite. */
export interface PlotSeries {
  quantity: string;
  polarization: string;
  angleDeg: number;
  wavelengths: number[];
  nominal: (number | null)[];
  low: (number | null)[] | null;
  high: (number | null)[] | null;
  lowP: number | null;
  highP: number | null;
}

/** GET /releases/:id: the snapshot filed at release time, plus the revision's status now. */
export interface ReleaseRecord {
  id: string;
  status: RevisionStatus | (string & {});
  releasedAt: string;
  releasedBy: PersonRef;
  workspace: { id: string; name: string };
  program: {
    id: string;
    name: string;
    customer: string;
    application: string;
    description: string;
    protective: boolean;
    targetYield: number;
    /** Absent on releases filed before program versions existed. */
    version?: number;
    minEvidenceTrials?: number;
    confidence?: number;
  };
  design: { id: string; name: string };
  revision: {
    id: string;
    number: number;
    hash: string;
    note: string;
    author: PersonRef | null;
    createdAt: string;
    stack: StackDesign;
    specMask: SpecMask;
  };
  nominal: { pass: boolean; bands: BandOutcome[] };
  yieldRun: {
    id: string;
    trials: number;
    seed: string;
    errorModel: ErrorModel;
    yield: number;
    passCount: number;
    interval: { low: number; high: number; confidence?: number; method?: string };
    bandFailures?: Array<{ id: string; count: number }>;
    criticalLayers?: Array<{ index: number; score?: number; correlation?: number }>;
    engineVersion: string;
    verified: boolean | null;
    clientVerified?: boolean;
    finishedAt: string | null;
  } | null;
  /** Absent on releases filed before evidence rules existed. */
  evidence?: {
    kind: string;
    programVersion: number;
    seedRule: string;
    figures: {
      trials: number;
      passCount: number;
      yield: number;
      lowerBound: number;
      confidence: number;
      targetYield: number;
      minTrials: number;
      pass: boolean;
    };
  } | null;
  deviation?: {
    required: boolean;
    bands: { id: string; change: string }[];
    current: {
      status: string;
      reason: string;
      requestedBy: PersonRef | null;
      requestedAt: string;
      decidedBy: PersonRef | null;
      decidedAt: string | null;
      decisionNote: string;
    } | null;
  };
  plot?: PlotSeries[];
  decisions: Decision[];
  threads: {
    total: number;
    open: number;
    resolved: number;
    items: Array<{
      id: string;
      severity: "blocking" | "advisory";
      status: "open" | "resolved";
      anchor: { kind: string; bandId?: string; start?: number; stop?: number; index?: number };
      revisionNumber: number;
      author: PersonRef | null;
    }>;
  };
  caution: string | null;
}

export const getRelease = (id: string) => api.get<ReleaseRecord>(`/releases/${encodeURIComponent(id)}`);

export const releaseQueryOptions = (id: string) =>
  queryOptions({ queryKey: ["releases", id], queryFn: () => getRelease(id) });

export const useRelease = (id: string) => useQuery(releaseQueryOptions(id));

/** The server's printable HTML of the same record. */
export const releasePrintUrl = (id: string) => `/api/v1/releases/${encodeURIComponent(id)}/print`;

/** The same record as a PDF download. */
export const releasePdfUrl = (id: string) => `/api/v1/releases/${encodeURIComponent(id)}/pdf`;
