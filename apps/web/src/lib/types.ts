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

/** A revision as listed in queues and design summaries. */
export interface RevisionSummary {
  id: string;
  designId?: string;
  number: number;
  status: RevisionStatus;
  authorName?: string;
  author?: PersonRef;
  createdAt: string;
  design?: { id: string; name: string };
  program?: { id: string; name: string };
}

/** A Monte Carlo yield estimate with its confidence interval (fractions 0..1). */
export interface YieldEstimate {
  yield: number;
  low: number;
  high: number;
}
