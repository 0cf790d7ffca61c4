// Response shapes of the design and program routes (docs/api.md).
import type { BandOutcome, Design, ErrorModel, SpecMask } from "@stackproof/optics";

export type RevisionStatus = "draft" | "in_review" | "changes_requested" | "approved" | "released" | "withdrawn";

export interface Program {
  id: string;
  name: string;
  customer: string;
  description: string;
  application: string;
  protective: boolean;
  targetYield: number;
  specMask: SpecMask;
  errorModel: ErrorModel;
  studyDefaults: { trials: number; seed: string };
  createdAt: string;
}

export interface RevisionSummary {
  id: string;
  number: number;
  status: RevisionStatus;
  note?: string;
  authorName?: string;
  author?: { id: string; name: string };
  createdAt: string;
}

export interface DesignDetail {
  id: string;
  name: string;
  program: { id: string; name: string; targetYield?: number; protective?: boolean };
  revisions: RevisionSummary[];
}

export interface Revision {
  id: string;
  designId: string;
  programId: string;
  number: number;
  status: RevisionStatus;
  stack: Design;
  specMask: SpecMask;
  note: string;
  author: { id: string; name: string };
  hash: string;
  createdAt: string;
  nominal: { pass: boolean; bands: BandOutcome[] };
}
