// Request and response schemas shared by the domain routes (also the OpenAPI document's source).
import { z } from "zod";
import {
  ErrorModelSchema,
  MAX_TRIALS,
  MaterialRoleSchema,
  SpecMaskSchema as EngineSpecMaskSchema,
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
import { MAX_TRIALS_PER_RUN, refineMaskLimits, trialsLimitMessage } from "./limits.ts";

/** The optics spec mask, within the request limits (MAX_SPEC_BANDS, MAX_POINTS_PER_BAND). */
const SpecMaskSchema = EngineSpecMaskSchema.superRefine(refineMaskLimits);

export const IdParams = z.object({ id: z.string().min(1).max(100) });

export const StudyDefaultsSchema = z.object({
  trials: z.number().int().min(1).max(Math.min(MAX_TRIALS, MAX_TRIALS_PER_RUN), trialsLimitMessage),
  seed: z.string().min(1).max(200),
});

const text = (maxLen: number) => z.string().trim().max(maxLen);

/** Smallest minimum of evidence trials a program may set (below it the Wilson bound says little). */
export const MIN_EVIDENCE_TRIALS_FLOOR = 100;
export const MinEvidenceTrials = z.number().int().min(MIN_EVIDENCE_TRIALS_FLOOR).max(MAX_TRIALS);
/** Two-sided confidence of the Wilson interval whose lower limit the gate compares with the target. */
export const Confidence = z.number().min(0.5).max(0.999);

export const ProgramCreateBody = z.object({
  name: text(200).min(1),
  customer: text(200).default(""),
  description: text(5000).default(""),
  application: text(200).default(""),
  protective: z.boolean().default(false),
  targetYield: z.number().min(0).max(1),
  minEvidenceTrials: MinEvidenceTrials.default(2000),
  confidence: Confidence.default(0.95),
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
    minEvidenceTrials: MinEvidenceTrials,
    confidence: Confidence,
    specMask: SpecMaskSchema,
    errorModel: ErrorModelSchema,
    studyDefaults: StudyDefaultsSchema,
    /** Why the evidence rules change (kept with the new program version). */
    note: text(2000),
  })
  .partial()
  .refine((b) => Object.keys(b).filter((k) => k !== "note").length > 0, {
    message: "give at least one field to change",
  });

export const ProgramSchema = z.object({
  id: z.string(),
  name: z.string(),
  customer: z.string(),
  description: z.string(),
  application: z.string(),
  protective: z.boolean(),
  targetYield: z.number(),
  minEvidenceTrials: z.number(),
  confidence: z.number(),
  /** Program version: every change of mask, error model, target, minimum trials or confidence makes a new one. */
  version: z.number(),
  specMask: SpecMaskJson,
  errorModel: ErrorModelJson,
  studyDefaults: StudyDefaultsSchema,
  createdAt: z.string(),
});
export type Program = z.infer<typeof ProgramSchema>;

/** GET /programs/:id/versions: every version of the evidence rules with who changed what from what to what. */
export const ProgramVersionSchema = z.object({
  version: z.number(),
  targetYield: z.number(),
  minEvidenceTrials: z.number(),
  confidence: z.number(),
  specMask: SpecMaskJson,
  errorModel: ErrorModelJson,
  changes: z.record(z.string(), z.object({ before: z.unknown(), after: z.unknown() })),
  changedBy: PersonRefSchema.nullable(),
  note: z.string(),
  createdAt: z.string(),
});
export type ProgramVersion = z.infer<typeof ProgramVersionSchema>;
export const ProgramVersionsResponse = itemsSchema(ProgramVersionSchema);

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

/** A revision's mask against its program's: differing bands and the state of its deviation (null: none asked). */
export const SpecDeviationSummarySchema = z.object({
  required: z.boolean(),
  bands: z.array(z.object({ id: z.string(), change: z.string() })),
  status: z.enum(["pending", "accepted", "rejected"]).nullable(),
  reason: z.string().nullable(),
});

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
  specDeviation: SpecDeviationSummarySchema,
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
  /** The revision this save starts from (the design's latest); a stale base answers 409 stale_base. */
  baseRevisionId: z
    .string({ error: "Name the revision this save starts from (baseRevisionId; null for a design's first)." })
    .min(1)
    .max(100)
    .nullable(),
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
  /** `evidence`: the server-assigned run the gate reads; `what_if`: any other study (never counts). */
  kind: z.enum(["evidence", "what_if"]),
  programVersion: z.number().nullable(),
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
  action: z.enum(["submit", "request_changes", "approve", "release", "withdraw", "return_to_review"]),
  fromStatus: RevisionStatusSchema,
  toStatus: RevisionStatusSchema,
  actor: PersonRefSchema,
  at: z.string(),
  revisionHash: z.string(),
  yieldRunId: z.string().nullable(),
  /** The program version the decision was made against (null for decisions from before versions existed). */
  programVersion: z.number().nullable(),
  note: z.string(),
});
export type Decision = z.infer<typeof DecisionSchema>;
/** Actions a member may request (return_to_review is written by a program change only). */
export type TransitionAction = Exclude<Decision["action"], "return_to_review">;

/** A spec deviation: the revision's mask accepted (or not) against the program's, with a written reason. */
export const DeviationSchema = z.object({
  id: z.string(),
  revisionId: z.string(),
  programVersion: z.number(),
  bands: z.array(z.object({ id: z.string(), change: z.string() })),
  reason: z.string(),
  requestedBy: PersonRefSchema.nullable(),
  requestedAt: z.string(),
  status: z.enum(["pending", "accepted", "rejected"]),
  decidedBy: PersonRefSchema.nullable(),
  decidedAt: z.string().nullable(),
  decisionNote: z.string(),
});
export type Deviation = z.infer<typeof DeviationSchema>;
export const DeviationListResponse = z.object({
  required: z.boolean(),
  bands: z.array(z.object({ id: z.string(), change: z.string() })),
  items: z.array(DeviationSchema),
});

/** An evidence run's figures against the program's rules: point yield, lower Wilson bound, trials. */
export const EvidenceFiguresSchema = z.object({
  trials: z.number(),
  passCount: z.number(),
  yield: z.number(),
  lowerBound: z.number(),
  confidence: z.number(),
  targetYield: z.number(),
  minTrials: z.number(),
  pass: z.boolean(),
});
export type EvidenceFigures = z.infer<typeof EvidenceFiguresSchema>;

/** The evidence run's server-assigned parameters under the current program version. */
export const EvidencePlanSchema = z.object({
  programVersion: z.number(),
  seed: z.string(),
  trials: z.number(),
  errorModel: ErrorModelJson,
  errorModelVersion: z.string(),
  confidence: z.number(),
  targetYield: z.number(),
  seedRule: z.string(),
});
export type EvidencePlan = z.infer<typeof EvidencePlanSchema>;

export const GateSchema = z.object({
  checks: z.array(
    z.object({
      id: z.enum(["verified_yield", "spec_deviation", "blocking_threads", "independent_approver", "state"]),
      ok: z.boolean(),
      message: z.string(),
    }),
  ),
  canApprove: z.boolean(),
  canRelease: z.boolean(),
  yieldRunId: z.string().nullable(),
  evidence: z.object({
    programVersion: z.number(),
    targetYield: z.number(),
    confidence: z.number(),
    minTrials: z.number(),
    seed: z.string(),
    seedRule: z.string(),
    errorModelVersion: z.string(),
    /** The evidence run's error model (the program's) in plain words (optics' describeProcess). */
    errorModelText: z.string(),
    run: z
      .object({ id: z.string(), status: z.string(), trials: z.number(), engineVersion: z.string() })
      .nullable(),
    figures: EvidenceFiguresSchema.nullable(),
  }),
  deviation: z.object({
    required: z.boolean(),
    accepted: z.boolean(),
    bands: z.array(z.object({ id: z.string(), change: z.string() })),
    current: DeviationSchema.nullable(),
  }),
});
export type Gate = z.infer<typeof GateSchema>;

/** The uploaded file of a multipart route, for the OpenAPI document (multer puts it in req.file, not the body). */
export const fileField = (description: string) =>
  z.any().optional().meta({ type: "string", format: "binary", description });

// ---- Responses of the overview, queue, programs and designs routes ----

/** A Monte Carlo estimate with its confidence interval (fractions 0..1) and the run it came from. */
export const YieldEstimateSchema = z.object({
  yield: z.number(),
  low: z.number(),
  high: z.number(),
  runId: z.string(),
  /** Evidence run: trials, the lower Wilson bound at the program's confidence, and whether it meets the target. */
  trials: z.number().optional(),
  lowerBound: z.number().optional(),
  confidence: z.number().optional(),
  pass: z.boolean().optional(),
});
export type YieldEstimate = z.infer<typeof YieldEstimateSchema>;

const DesignRowBase = z.object({
  design: PersonRefSchema,
  program: z.object({
    id: z.string(),
    name: z.string(),
    targetYield: z.number(),
    protective: z.boolean(),
    version: z.number().optional(),
    minEvidenceTrials: z.number().optional(),
    confidence: z.number().optional(),
  }),
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
export const CreateDesignResponse = DesignSchemaOut.extend({
  design: DesignSchemaOut,
  revision: RevisionSchema,
});

const RevisionRef = z.object({ id: z.string(), number: z.number(), hash: z.string() });
const LayerJson = z.custom<Layer>((v) => typeof v === "object" && v !== null);

/** GET /revisions/:id/diff?against=: layers aligned by index in deposition order. */
export const RevisionDiffSchema = z.object({
  added: z.array(z.object({ index: z.number(), layer: LayerJson })),
  removed: z.array(z.object({ index: z.number(), layer: LayerJson })),
  changed: z.array(
    z.object({
      index: z.number(),
      before: LayerJson,
      after: LayerJson,
      deltaNm: z.number(),
      materialChanged: z.boolean(),
    }),
  ),
  unchanged: z.number(),
  other: z.array(z.string()),
  totalThicknessDeltaNm: z.number(),
  specMaskChanged: z.boolean(),
  specDeviation: z.object({ before: SpecDeviationSummarySchema, after: SpecDeviationSummarySchema }),
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

export const CreateYieldRunResponse = z.object({ run: YieldRunSchema, reused: z.boolean() });
export const EvidenceResponse = z.object({
  plan: EvidencePlanSchema,
  run: YieldRunSchema.nullable(),
  figures: EvidenceFiguresSchema.nullable(),
});
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
  yield: z
    .object({
      yield: z.number(),
      low: z.number(),
      high: z.number(),
      trials: z.number(),
      lowerBound: z.number().nullable(),
      confidence: z.number().nullable(),
    })
    .nullable(),
});
export type ReleaseSummary = z.infer<typeof ReleaseSummarySchema>;
export const ReleaseListResponse = pageSchema(ReleaseSummarySchema);

type YieldResultT = YieldResult;

const nullableNumbers = z.array(z.number().nullable());
export const PlotSeriesSchema = z.object({
  quantity: z.string(),
  polarization: z.string(),
  angleDeg: z.number(),
  /** The conditions in words, e.g. "f/2 cone (14.48° half-angle) about 0°, unpolarized"; absent on releases filed before. */
  conditions: z.string().optional(),
  wavelengths: z.array(z.number()),
  nominal: nullableNumbers,
  low: nullableNumbers.nullable(),
  high: nullableNumbers.nullable(),
  lowP: z.number().nullable(),
  highP: z.number().nullable(),
});
export type PlotSeries = z.infer<typeof PlotSeriesSchema>;

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
    /** Absent on releases filed before program versions existed. */
    version: z.number().optional(),
    minEvidenceTrials: z.number().optional(),
    confidence: z.number().optional(),
    specMask: SpecMaskJson.optional(),
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
  /** Absent on releases filed before evidence rules existed. */
  evidence: z
    .object({
      kind: z.string(),
      programVersion: z.number(),
      seedRule: z.string(),
      figures: EvidenceFiguresSchema,
    })
    .nullable()
    .optional(),
  deviation: z
    .object({
      required: z.boolean(),
      bands: z.array(z.object({ id: z.string(), change: z.string() })),
      current: DeviationSchema.nullable(),
    })
    .optional(),
  /** Nominal curve and the evidence run's 5–95 % envelope per (quantity, polarization, angle); null where not finite. */
  plot: z.array(PlotSeriesSchema).optional(),
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

// ---- Error details (the `details` of an error answer the web app reads) ----

/** One problem in an uploaded CSV file; a 422 invalid_csv answer's details are a list of these (at most 50). */
export const CsvProblemSchema = z.object({
  /** Line of the file (the header is line 1). */
  row: z.number(),
  /** Column name, "a|b" for a missing choice, or "-" when the problem is not in one column. */
  column: z.string(),
  message: z.string(),
});
export type CsvProblem = z.infer<typeof CsvProblemSchema>;
export const CsvProblemsDetails = z.array(CsvProblemSchema);

const RevisionNumberRef = z.object({ id: z.string(), number: z.number() });
/** 409 stale_base: the revision a save started from (null: none) and the design's latest revision. */
export const StaleBaseDetails = z.object({
  baseRevision: RevisionNumberRef.nullable(),
  latestRevision: RevisionNumberRef,
});
export type StaleBase = z.infer<typeof StaleBaseDetails>;

// ---- Request bodies, params and queries of the domain routes (JSON; multipart upload fields stay with their routes)

/** POST /revisions/:id/threads. */
export const NewThreadBody = z.object({
  anchor: AnchorSchema,
  severity: z.enum(["blocking", "advisory"]),
  body: CommentBodySchema,
});
export type NewThreadInput = z.input<typeof NewThreadBody>;
/** POST /threads/:id/comments. */
export const CommentBody = z.object({ body: CommentBodySchema });
/** POST /threads/:id/resolve and /reopen: an optional note, kept as a comment. */
export const ThreadStatusBody = z.object({ note: z.string().trim().max(10000).optional() });

/** GET /revisions/:id/gate: pin the yield check to one run. */
export const GateQuery = z.object({ yieldRunId: z.string().min(1).max(100).optional() });
/** POST /revisions/:id/transitions. */
export const TransitionBody = z.object({
  action: z.enum(["submit", "request_changes", "approve", "release", "withdraw"]),
  note: z.string().trim().max(5000).optional(),
  yieldRunId: z.string().min(1).max(100).optional(),
});
export type TransitionInput = z.input<typeof TransitionBody>;
/** POST /revisions/:id/deviations. */
export const DeviationRequestBody = z.object({
  reason: z.string().trim().min(10, { message: "write the reason (10 characters or more)" }).max(5000),
});
/** /revisions/:id/deviations/:deviationId/decision. */
export const DeviationParams = z.object({
  id: z.string().min(1).max(100),
  deviationId: z.string().min(1).max(100),
});
/** POST /revisions/:id/deviations/:deviationId/decision. */
export const DeviationDecisionBody = z.object({
  accept: z.boolean(),
  note: z.string().trim().max(5000).default(""),
});
export type DeviationDecisionInput = z.input<typeof DeviationDecisionBody>;

/** GET /revisions/:id/diff?against=: the revision compared with (before). */
export const DiffQuery = z.object({ against: z.string().min(1).max(100) });

/**
 * A yield result computed in the browser, sent with a run request so the server compares it with its own (the
 * optics YieldResult's fields that verification reads; other fields are kept as sent).
 */
export const ClientResultSchema = z
  .object({
    trials: z.number().int().min(1),
    seed: z.string().min(1),
    passCount: z.number().int().min(0),
    yield: z.number().min(0).max(1),
    interval: z.looseObject({ low: z.number(), high: z.number() }),
    bandFailures: z.array(z.object({ id: z.string(), count: z.number().int().min(0) })),
    errorModel: ErrorModelSchema,
    engineVersion: z.string().optional(),
  })
  .loose();
export type ClientResult = z.infer<typeof ClientResultSchema>;
/** POST /revisions/:id/yield-runs: without seed, trials and error model (or with the evidence run's) the evidence run. */
export const YieldRunBody = z.object({
  trials: z
    .number()
    .int()
    .min(1)
    .max(Math.min(MAX_TRIALS, MAX_TRIALS_PER_RUN), trialsLimitMessage)
    .optional(),
  seed: z.string().min(1).max(200).optional(),
  errorModel: ErrorModelSchema.optional(),
  clientResult: ClientResultSchema.optional(),
});
export type YieldRunInput = z.input<typeof YieldRunBody>;
/** POST /revisions/:id/evidence-run. */
export const EvidenceRunBody = z.object({ clientResult: ClientResultSchema.optional() });
