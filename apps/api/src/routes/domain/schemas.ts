// Request and response schemas shared by the domain routes (also the OpenAPI document's source).
import { z } from "zod";
import { ErrorModelSchema, MAX_TRIALS, SpecMaskSchema } from "@stackproof/optics";

export const IdParams = z.object({ id: z.string().min(1).max(100) });

export const StudyDefaultsSchema = z.object({
  trials: z.number().int().min(1).max(MAX_TRIALS),
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
  version: z.number(),
  specMask: z.unknown(),
  errorModel: z.unknown(),
  studyDefaults: StudyDefaultsSchema,
  createdAt: z.string(),
});

export const ProgramVersionSchema = z.object({
  version: z.number(),
  targetYield: z.number(),
  minEvidenceTrials: z.number(),
  confidence: z.number(),
  specMask: z.unknown(),
  errorModel: z.unknown(),
  changes: z.record(z.string(), z.object({ before: z.unknown(), after: z.unknown() })),
  changedBy: z.object({ id: z.string(), name: z.string() }).nullable(),
  note: z.string(),
  createdAt: z.string(),
});

export const PersonSchema = z.object({ id: z.string(), name: z.string() }).nullable();

export const RevisionStatusSchema = z.enum([
  "draft",
  "in_review",
  "changes_requested",
  "approved",
  "released",
  "withdrawn",
]);

export const RevisionSummarySchema = z.object({
  id: z.string(),
  number: z.number(),
  status: RevisionStatusSchema,
  note: z.string(),
  hash: z.string(),
  author: z.object({ id: z.string(), name: z.string() }),
  authorName: z.string(),
  createdAt: z.string(),
  statusChangedAt: z.string().nullable(),
  designId: z.string(),
  designName: z.string(),
  programId: z.string(),
  programName: z.string(),
});

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
  stack: z.unknown(),
  specMask: z.unknown(),
  note: z.string(),
  author: PersonSchema,
  hash: z.string(),
  createdAt: z.string(),
  statusChangedAt: z.string().nullable(),
  nominal: z.object({
    pass: z.boolean(),
    bands: z.array(z.unknown()),
    merit: z.number(),
    cautions: z.array(z.string()),
  }),
  specDeviation: SpecDeviationSummarySchema,
});

export const DesignSchemaOut = z.object({
  id: z.string(),
  name: z.string(),
  createdAt: z.string(),
  program: z.object({ id: z.string(), name: z.string(), targetYield: z.number(), protective: z.boolean() }),
  revisions: z.array(RevisionSummarySchema),
});

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

export const YieldRunSchema = z.object({
  id: z.string(),
  revisionId: z.string(),
  status: z.enum(["queued", "running", "done", "failed", "cancelled"]),
  progress: z.object({ done: z.number(), total: z.number() }),
  trials: z.number(),
  seed: z.string(),
  errorModel: z.unknown(),
  result: z.unknown().nullable(),
  verified: z.boolean().nullable(),
  clientSubmitted: z.boolean(),
  mismatch: z.string().nullable(),
  engineVersion: z.string(),
  kind: z.enum(["evidence", "what_if"]),
  programVersion: z.number().nullable(),
  error: z.string().nullable(),
  requestedBy: PersonSchema,
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
});

export const DecisionSchema = z.object({
  id: z.string(),
  action: z.enum(["submit", "request_changes", "approve", "release", "withdraw", "return_to_review"]),
  fromStatus: RevisionStatusSchema,
  toStatus: RevisionStatusSchema,
  actor: z.object({ id: z.string(), name: z.string() }),
  at: z.string(),
  revisionHash: z.string(),
  yieldRunId: z.string().nullable(),
  programVersion: z.number().nullable(),
  note: z.string(),
});

const PersonRef = z.object({ id: z.string(), name: z.string() });

export const DeviationSchema = z.object({
  id: z.string(),
  revisionId: z.string(),
  programVersion: z.number(),
  bands: z.array(z.object({ id: z.string(), change: z.string() })),
  reason: z.string(),
  requestedBy: PersonRef.nullable(),
  requestedAt: z.string(),
  status: z.enum(["pending", "accepted", "rejected"]),
  decidedBy: PersonRef.nullable(),
  decidedAt: z.string().nullable(),
  decisionNote: z.string(),
});

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

export const EvidencePlanSchema = z.object({
  programVersion: z.number(),
  seed: z.string(),
  trials: z.number(),
  errorModel: z.unknown(),
  errorModelVersion: z.string(),
  confidence: z.number(),
  targetYield: z.number(),
  seedRule: z.string(),
});

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

/** The uploaded file of a multipart route, for the OpenAPI document (multer puts it in req.file, not the body). */
export const fileField = (description: string) =>
  z.any().optional().meta({ type: "string", format: "binary", description });
