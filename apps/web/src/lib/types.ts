// Shapes shared by several features (docs/api.md). Feature-specific shapes live in the feature's api files.
import type { RevisionStatus } from "../components/ui/status-pill.tsx";

export type { RevisionStatus };

/** A cursor page: `?limit=&cursor=` → `{items, nextCursor}`. */
export interface Page<T> {
  items: T[];
  nextCursor: string | null;
}

export interface PersonRef {
  id: string;
  name: string;
}

/** A revision as listed in queues and design summaries (api: RevisionSummarySchema). */
export interface RevisionSummary {
  id: string;
  number: number;
  status: RevisionStatus;
  note?: string;
  hash?: string;
  author?: PersonRef | null;
  authorName?: string;
  createdAt: string;
  statusChangedAt?: string | null;
  designId: string;
  designName?: string;
  programId?: string;
  programName?: string;
}

/** One band of a spec mask (optics docs/studies.md). Values in percent for R/T/A, OD units for OD. */
export interface SpecBand {
  id: string;
  label?: string;
  start: number;
  stop: number;
  step?: number;
  quantity: "R" | "T" | "A" | "OD";
  polarization: "s" | "p" | "u";
  angleDeg: number;
  requirement: "min" | "max" | "avgMin" | "avgMax";
  value: number;
  tolerance?: number;
}

export interface SpecMask {
  protective?: boolean;
  bands: SpecBand[];
}

/** Process error model (optics docs/studies.md); all spreads are 1σ. */
export interface ErrorModel {
  thickness?: {
    relativePct?: number;
    absoluteNm?: number;
    distribution?: "normal" | "uniform";
    truncateSigma?: number;
  };
  systematicPct?: number | Record<string, number>;
  indexDriftPct?: number | Record<string, number>;
  indexNoisePct?: number;
}

/** A Monte Carlo yield estimate with its confidence interval (fractions 0..1). */
export interface YieldEstimate {
  yield: number;
  low: number;
  high: number;
  /** Evidence runs: trials, the lower Wilson bound at the program's confidence, and whether it meets the target. */
  trials?: number;
  lowerBound?: number;
  confidence?: number;
  pass?: boolean;
}
