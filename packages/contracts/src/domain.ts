// Request and response schemas shared by the domain routes (also the OpenAPI document's source).
import { z } from "zod";
import {
  ErrorModelSchema,
  MAX_TRIALS,
  MaterialRoleSchema,
  SpecMaskSchema,
  type Layer,
  type YieldResult,
} from "@stackproof/optics";
import {
  BandOutcomeJson,
  DesignJson,
  ErrorModelJson,
  MaterialModelJson,
  PersonRefSchema,
  SpecMaskJson,
  YieldResultJson,
  itemsSchema,
  pageSchema,
} from "./json.ts";

export const IdParams = z.object({ id: z.string().min(1).max(100) });

export const StudyDefaultsSchema = z.object({
  trials: z.number().int().min(1).max(MAX_TRIALS),
  seed: z.string().min(1).max(200),
});

const text = (maxLen: number) => z.string().trim().max(maxLen);

export const ProgramCreateBody = z.object({
  name: text(200).min(1),
  customer: text(200).default(""),
  description: text(5000).default(""),
  application: text(200).default(""),
  protective: z.boolean().default(false),
  targetYield: z.number().min(0).max(1),
  specMask: SpecMaskSchema,
  errorModel: ErrorModelSchema,
  studyDefaults: StudyDefaultsSchema.default({ trials: 2000, seed: "stackproof" }),
});

export const ProgramPatchBody = z
  .object({
    name: text(200).min(1),
    customer: text(200),
    description: text(5000),
    application: text(200),
    protective: z.boolean(),
    targetYield: z.number().min(0).max(1),
    specMask: SpecMaskSchema,
    errorModel: ErrorModelSchema,
    studyDefaults: StudyDefaultsSchema,
  })
  .partial()
  .refine((b) => Object.keys(b).length > 0, { message: "give at least one field to change" });

export const ProgramSchema = z.object({
  id: z.string(),
  name: z.string(),
  customer: z.string(),
  description: z.string(),
  application: z.string(),
  protective: z.boolean(),
  targetYield: z.number(),
  specMask: SpecMaskJson,
  errorModel: ErrorModelJson,
  studyDefaults: StudyDefaultsSchema,
  createdAt: z.string(),
});
export type Program = z.infer<typeof ProgramSchema>;

export const PersonSchema = PersonRefSchema.nullable();

export const RevisionStatusSchema = z.enum([
  "draft",
  "in_review",
  "changes_requested",
  "approved",
  "released",
  "withdrawn",
]);
export type RevisionStatus = z.infer<typeof RevisionStatusSchema>;

export const RevisionSummarySchema = z.object({
  id: z.string(),
  number: z.number(),
  status: RevisionStatusSchema,
  note: z.string(),
  hash: z.string(),
  author: PersonRefSchema,
  authorName: z.string(),
  createdAt: z.string(),
  statusChangedAt: z.string().nullable(),
  designId: z.string(),
  designName: z.string(),
  programId: z.string(),
  programName: z.string(),
});
export type RevisionSummary = z.infer<typeof RevisionSummarySchema>;

export const RevisionSchema = z.object({
  id: z.string(),
  designId: z.string(),
  designName: z.string(),
  programId: z.string(),
  programName: z.string(),
  number: z.number(),
  status: RevisionStatusSchema,
  stack: DesignJson,
  specMask: SpecMaskJson,
  note: z.string(),
  author: PersonSchema,
  hash: z.string(),
  createdAt: z.string(),
  statusChangedAt: z.string().nullable(),
  nominal: z.object({
    pass: z.boolean(),
    bands: z.array(BandOutcomeJson),
    merit: z.number(),
    cautions: z.array(z.string()),
  }),
});
export type Revision = z.infer<typeof RevisionSchema>;

export const DesignSchemaOut = z.object({
  id: z.string(),
  name: z.string(),
  createdAt: z.string(),
  program: z.object({ id: z.string(), name: z.string(), targetYield: z.number(), protective: z.boolean() }),
  revisions: z.array(RevisionSummarySchema),
});
export type DesignDetail = z.infer<typeof DesignSchemaOut>;

export const NewDesignBody = z.object({
  name: text(200).min(1),
  stack: z.unknown(),
  note: text(5000).default(""),
  specMask: z.unknown().optional(),
});

export const NewRevisionBody = z.object({
  stack: z.unknown(),
  note: text(5000).default(""),
  specMask: z.unknown().optional(),
});

export const AnchorSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("band"), bandId: z.string().min(1) }),
  z
    .object({
      kind: z.literal("range"),
      start: z.number().positive().finite(),
      stop: z.number().positive().finite(),
    })
    .refine((a) => a.stop >= a.start, { message: "stop must be ≥ start", path: ["stop"] }),
  z.object({ kind: z.literal("layer"), index: z.number().int().min(0) }),
  z.object({ kind: z.literal("design") }),
]);

export const CommentBodySchema = z.string().trim().min(1, { message: "write something" }).max(10000);

export const ThreadSchema = z.object({
  id: z.string(),
  revisionId: z.string(),
  revisionNumber: z.number(),
  anchor: AnchorSchema,
  severity: z.enum(["blocking", "advisory"]),
  status: z.enum(["open", "resolved"]),
  author: PersonSchema,
  createdAt: z.string(),
  resolvedAt: z.string().nullable(),
  resolvedBy: PersonSchema,
  comments: z.array(
    z.object({
      id: z.string(),
      author: PersonSchema,
      body: z.string(),
      mentions: z.array(z.object({ id: z.string(), name: z.string() })),
      createdAt: z.string(),
    }),
  ),
  anchorPasses: z.boolean().nullable(),
});
export type ReviewThread = z.infer<typeof ThreadSchema>;
export type ThreadAnchor = z.infer<typeof AnchorSchema>;

export const YieldRunSchema = z.object({
  id: z.string(),
  revisionId: z.string(),
  status: z.enum(["queued", "running", "done", "failed", "cancelled"]),
  progress: z.object({ done: z.number(), total: z.number() }),
  trials: z.number(),
  seed: z.string(),
  errorModel: ErrorModelJson,
  result: YieldResultJson.nullable(),
  verified: z.boolean().nullable(),
  clientSubmitted: z.boolean(),
  mismatch: z.string().nullable(),
  engineVersion: z.string(),
  error: z.string().nullable(),
  requestedBy: PersonSchema,
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
});
export type YieldRun = z.infer<typeof YieldRunSchema>;
export type YieldRunStatus = YieldRun["status"];

export const DecisionSchema = z.object({
  id: z.string(),
  action: z.enum(["submit", "request_changes", "approve", "release", "withdraw"]),
  fromStatus: RevisionStatusSchema,
  toStatus: RevisionStatusSchema,
  actor: PersonRefSchema,
  at: z.string(),
  revisionHash: z.string(),
  yieldRunId: z.string().nullable(),
  note: z.string(),
});
export type Decision = z.infer<typeof DecisionSchema>;
export type TransitionAction = Decision["action"];

export const GateSchema = z.object({
  checks: z.array(
    z.object({
      id: z.enum(["verified_yield", "blocking_threads", "independent_approver", "state"]),
      ok: z.boolean(),
      message: z.string(),
    }),
  ),
  canApprove: z.boolean(),
  canRelease: z.boolean(),
  yieldRunId: z.string().nullable(),
});
export type Gate = z.infer<typeof GateSchema>;

/** The uploaded file of a multipart route, for the OpenAPI document (multer puts it in req.file, not the body). */
export const fileField = (description: string) =>
  z.any().optional().meta({ type: "string", format: "binary", description });

// ---- Responses of the overview, queue, programs and designs routes ----

/** A Monte Carlo estimate with its confidence interval (fractions 0..1) and the run it came from. */
export const YieldEstimateSchema = z.object({ yield: z.number(), low: z.number(), high: z.number(), runId: z.string() });
export type YieldEstimate = z.infer<typeof YieldEstimateSchema>;

const DesignRowBase = z.object({
  design: PersonRefSchema,
  program: z.object({ id: z.string(), name: z.string(), targetYield: z.number(), protective: z.boolean() }),
  latestRevision: z
    .object({
      id: z.string(),
      number: z.number(),
      status: RevisionStatusSchema,
      authorName: z.string(),
      createdAt: z.string(),
    })
    .nullable(),
  latestVerifiedYield: YieldEstimateSchema.nullable(),
  openBlockingThreads: z.number(),
  openThreads: z.number(),
});

/** GET /overview: one row per design of the workspace. */
export const OverviewRowSchema = DesignRowBase;
export type OverviewRow = z.infer<typeof OverviewRowSchema>;
export const OverviewResponse = itemsSchema(OverviewRowSchema);

/** GET /queue: revisions waiting for the signed-in member, by role. */
export const QueueResponse = z.object({
  changesRequested: z.array(RevisionSummarySchema),
  reviewRequested: z.array(RevisionSummarySchema),
  readyForDecision: z.array(RevisionSummarySchema),
  readyForRelease: z.array(RevisionSummarySchema),
});
export type Queue = z.infer<typeof QueueResponse>;

export const ProgramListResponse = pageSchema(ProgramSchema);

/** GET /programs/:id: the program with one overview row per design. */
export const ProgramDetailSchema = ProgramSchema.extend({ designs: z.array(OverviewRowSchema) });
export type ProgramDetail = z.infer<typeof ProgramDetailSchema>;
export type ProgramBody = z.input<typeof ProgramCreateBody>;

export const ProgramDesignsResponse = itemsSchema(DesignSchemaOut);

/** POST /programs/:id/designs: the design (also spread at the top level) and its revision 1. */
export const CreateDesignResponse = DesignSchemaOut.extend({ design: DesignSchemaOut, revision: RevisionSchema });

const RevisionRef = z.object({ id: z.string(), number: z.number(), hash: z.string() });
const LayerJson = z.custom<Layer>((v) => typeof v === "object" && v !== null);

/** GET /revisions/:id/diff?against=: layers aligned by index in deposition order. */
export const RevisionDiffSchema = z.object({
  added: z.array(z.object({ index: z.number(), layer: LayerJson })),
  removed: z.array(z.object({ index: z.number(), layer: LayerJson })),
  changed: z.array(
    z.object({ index: z.number(), before: LayerJson, after: LayerJson, deltaNm: z.number(), materialChanged: z.boolean() }),
  ),
  unchanged: z.number(),
  other: z.array(z.string()),
  totalThicknessDeltaNm: z.number(),
  specMaskChanged: z.boolean(),
  summary: z.string(),
  before: RevisionRef,
  after: RevisionRef,
});
export type RevisionDiff = z.infer<typeof RevisionDiffSchema>;

/** POST /imports/design: the parsed design; nothing is stored. */
export const ImportDesignResponse = z.object({ stack: DesignJson, warnings: z.array(z.string()) });

// ---- Threads ----

export const ThreadListResponse = itemsSchema(ThreadSchema);

// ---- Yield runs ----

export const CreateYieldRunResponse = z.object({ run: YieldRunSchema });
export const YieldRunListResponse = pageSchema(YieldRunSchema);

// ---- Workflow and releases ----

export const TransitionResponse = z.object({
  revision: RevisionSchema,
  decision: DecisionSchema,
  releaseId: z.string().nullable(),
});
export type TransitionResult = z.infer<typeof TransitionResponse>;

export const DecisionListResponse = itemsSchema(DecisionSchema);

/** A row of GET /releases (newest first). */
export const ReleaseSummarySchema = z.object({
  id: z.string(),
  releasedAt: z.string(),
  releasedBy: PersonRefSchema,
  status: z.string(),
  program: z.object({ id: z.string(), name: z.string(), protective: z.boolean() }),
  design: PersonRefSchema,
  revision: RevisionRef,
  yield: z.object({ yield: z.number(), low: z.number(), high: z.number(), trials: z.number() }).nullable(),
});
export type ReleaseSummary = z.infer<typeof ReleaseSummarySchema>;
export const ReleaseListResponse = pageSchema(ReleaseSummarySchema);

type YieldResultT = YieldResult;

/** GET /releases/:id: the snapshot filed at release time, plus the revision's status now. */
export const ReleaseRecordSchema = z.object({
  id: z.string(),
  status: z.string(),
  releasedAt: z.string(),
  releasedBy: PersonRefSchema,
  workspace: PersonRefSchema,
  program: z.object({
    id: z.string(),
    name: z.string(),
    customer: z.string(),
    application: z.string(),
    description: z.string(),
    protective: z.boolean(),
    targetYield: z.number(),
  }),
  design: PersonRefSchema,
  revision: RevisionRef.extend({
    note: z.string(),
    author: PersonSchema,
    createdAt: z.string(),
    stack: DesignJson,
    specMask: SpecMaskJson,
  }),
  nominal: z.object({ pass: z.boolean(), bands: z.array(BandOutcomeJson) }),
  yieldRun: z
    .object({
      id: z.string(),
      trials: z.number(),
      seed: z.string(),
      errorModel: ErrorModelJson,
      yield: z.number(),
      passCount: z.number(),
      interval: z.custom<YieldResultT["interval"]>((v) => typeof v === "object" && v !== null),
      bandFailures: z.custom<YieldResultT["bandFailures"]>((v) => v !== undefined),
      criticalLayers: z.custom<YieldResultT["criticalLayers"]>((v) => Array.isArray(v)),
      engineVersion: z.string(),
      verified: z.boolean().nullable(),
      clientVerified: z.boolean(),
      finishedAt: z.string().nullable(),
    })
    .nullable(),
  decisions: z.array(DecisionSchema),
  threads: z.object({
    total: z.number(),
    open: z.number(),
    resolved: z.number(),
    items: z.array(
      z.object({
        id: z.string(),
        severity: z.enum(["blocking", "advisory"]),
        status: z.enum(["open", "resolved"]),
        anchor: AnchorSchema,
        revisionNumber: z.number(),
        author: PersonSchema,
      }),
    ),
  }),
  caution: z.string().nullable(),
});
export type ReleaseRecord = z.infer<typeof ReleaseRecordSchema>;

// ---- Materials and measurements ----

export const MaterialOutSchema = z.object({
  id: z.string(),
  name: z.string(),
  role: MaterialRoleSchema,
  source: z.string(),
  builtIn: z.boolean(),
  model: MaterialModelJson,
  createdAt: z.string().nullable(),
});
export type MaterialItem = z.infer<typeof MaterialOutSchema>;
export const MaterialListResponse = itemsSchema(MaterialOutSchema);

export const MeasurementOutSchema = z.object({
  id: z.string(),
  revisionId: z.string(),
  label: z.string(),
  quantity: z.enum(["R", "T"]),
  angleDeg: z.number(),
  polarization: z.enum(["s", "p", "u"]),
  wavelengths: z.array(z.number()),
  /** percent */
  values: z.array(z.number()),
  createdAt: z.string(),
});
export type MeasuredSpectrum = z.infer<typeof MeasurementOutSchema>;
export const MeasurementListResponse = pageSchema(MeasurementOutSchema);

// ---- Health ----

/** GET /api/health (outside /api/v1). */
export const HealthSchema = z.object({
  status: z.enum(["ok", "degraded"]),
  version: z.string(),
  engineVersion: z.string(),
  database: z.enum(["ok", "error"]),
  migrations: z.object({ applied: z.number(), available: z.number(), upToDate: z.boolean() }),
});
export type Health = z.infer<typeof HealthSchema>;
