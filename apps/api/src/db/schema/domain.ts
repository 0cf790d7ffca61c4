// Programs, designs, revisions, studies, review threads and release decisions.
// JSON columns hold values in the optics package's formats (design, spec mask, error model, yield result).
import { sql } from "drizzle-orm";
import type { Design, ErrorModel, MaterialModel, SpecMask, YieldResult } from "@stackproof/optics";
import type { ClientResult } from "../../yield/verify.ts";
import { index, integer, real, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { users, workspaces } from "./auth.ts";

const createdAt = () =>
  integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`);

export const REVISION_STATUSES = [
  "draft",
  "in_review",
  "changes_requested",
  "approved",
  "released",
  "withdrawn",
] as const;
export type RevisionStatus = (typeof REVISION_STATUSES)[number];

export const YIELD_RUN_STATUSES = ["queued", "running", "done", "failed", "cancelled"] as const;
export type YieldRunStatus = (typeof YIELD_RUN_STATUSES)[number];

export const DECISION_ACTIONS = ["submit", "request_changes", "approve", "release", "withdraw"] as const;
export type DecisionAction = (typeof DECISION_ACTIONS)[number];

export interface StudyDefaults {
  trials: number;
  seed: string;
}

export type ThreadAnchor =
  | { kind: "band"; bandId: string }
  | { kind: "range"; start: number; stop: number }
  | { kind: "layer"; index: number }
  | { kind: "design" };

export const programs = sqliteTable(
  "programs",
  {
    id: text("id").primaryKey(),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    customer: text("customer").notNull().default(""),
    description: text("description").notNull().default(""),
    application: text("application").notNull().default(""),
    protective: integer("protective", { mode: "boolean" }).notNull().default(false),
    targetYield: real("target_yield").notNull(),
    specMask: text("spec_mask", { mode: "json" }).$type<SpecMask>().notNull(),
    errorModel: text("error_model", { mode: "json" }).$type<ErrorModel>().notNull(),
    studyDefaults: text("study_defaults", { mode: "json" }).$type<StudyDefaults>().notNull(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [index("programs_workspace_idx").on(t.workspaceId)],
);

export const designs = sqliteTable(
  "designs",
  {
    id: text("id").primaryKey(),
    programId: text("program_id")
      .notNull()
      .references(() => programs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [index("designs_program_idx").on(t.programId)],
);

/** A revision's content (stack, mask, note, author, hash) never changes; only its workflow status does. */
export const revisions = sqliteTable(
  "revisions",
  {
    id: text("id").primaryKey(),
    designId: text("design_id")
      .notNull()
      .references(() => designs.id, { onDelete: "cascade" }),
    number: integer("number").notNull(),
    stack: text("stack", { mode: "json" }).$type<Design>().notNull(),
    specMask: text("spec_mask", { mode: "json" }).$type<SpecMask>().notNull(),
    note: text("note").notNull().default(""),
    authorId: text("author_id")
      .notNull()
      .references(() => users.id),
    hash: text("hash").notNull(),
    status: text("status", { enum: REVISION_STATUSES }).notNull().default("draft"),
    statusChangedAt: integer("status_changed_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("revisions_design_number_unique").on(t.designId, t.number),
    index("revisions_status_idx").on(t.status),
  ],
);

/** Workspace materials (uploaded n,k tables); usable in the workspace's designs as design-local materials. */
export const materials = sqliteTable(
  "materials",
  {
    id: text("id").primaryKey(),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    /** The id designs refer to (unique in the workspace, never a built-in id). */
    materialId: text("material_id").notNull(),
    name: text("name").notNull(),
    role: text("role").notNull(),
    source: text("source").notNull(),
    model: text("model", { mode: "json" }).$type<MaterialModel>().notNull(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("materials_workspace_material_unique").on(t.workspaceId, t.materialId)],
);

export const measurements = sqliteTable(
  "measurements",
  {
    id: text("id").primaryKey(),
    revisionId: text("revision_id")
      .notNull()
      .references(() => revisions.id, { onDelete: "cascade" }),
    label: text("label").notNull(),
    quantity: text("quantity", { enum: ["R", "T"] }).notNull(),
    angleDeg: real("angle_deg").notNull(),
    polarization: text("polarization", { enum: ["s", "p", "u"] }).notNull(),
    wavelengths: text("wavelengths", { mode: "json" }).$type<number[]>().notNull(),
    values: text("values", { mode: "json" }).$type<number[]>().notNull(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [index("measurements_revision_idx").on(t.revisionId)],
);

export const yieldRuns = sqliteTable(
  "yield_runs",
  {
    id: text("id").primaryKey(),
    revisionId: text("revision_id")
      .notNull()
      .references(() => revisions.id, { onDelete: "cascade" }),
    requestedBy: text("requested_by").references(() => users.id, { onDelete: "set null" }),
    status: text("status", { enum: YIELD_RUN_STATUSES }).notNull().default("queued"),
    progressDone: integer("progress_done").notNull().default(0),
    trials: integer("trials").notNull(),
    seed: text("seed").notNull(),
    errorModel: text("error_model", { mode: "json" }).$type<ErrorModel>().notNull(),
    clientResult: text("client_result", { mode: "json" }).$type<ClientResult>(),
    result: text("result", { mode: "json" }).$type<YieldResult>(),
    verified: integer("verified", { mode: "boolean" }),
    mismatch: text("mismatch"),
    engineVersion: text("engine_version").notNull(),
    error: text("error"),
    createdAt: createdAt(),
    startedAt: integer("started_at", { mode: "timestamp_ms" }),
    finishedAt: integer("finished_at", { mode: "timestamp_ms" }),
  },
  (t) => [index("yield_runs_revision_idx").on(t.revisionId), index("yield_runs_status_idx").on(t.status)],
);

/** Finished chunks of a run in progress, so that a restarted process resumes instead of starting over. */
export const yieldChunks = sqliteTable(
  "yield_chunks",
  {
    runId: text("run_id")
      .notNull()
      .references(() => yieldRuns.id, { onDelete: "cascade" }),
    startTrial: integer("start_trial").notNull(),
    count: integer("count").notNull(),
    data: text("data", { mode: "json" }).$type<unknown>().notNull(),
  },
  (t) => [uniqueIndex("yield_chunks_run_start_unique").on(t.runId, t.startTrial)],
);

export const threads = sqliteTable(
  "threads",
  {
    id: text("id").primaryKey(),
    designId: text("design_id")
      .notNull()
      .references(() => designs.id, { onDelete: "cascade" }),
    /** The revision the thread was opened on; it carries forward to later revisions of the design. */
    revisionId: text("revision_id")
      .notNull()
      .references(() => revisions.id, { onDelete: "cascade" }),
    revisionNumber: integer("revision_number").notNull(),
    anchor: text("anchor", { mode: "json" }).$type<ThreadAnchor>().notNull(),
    severity: text("severity", { enum: ["blocking", "advisory"] }).notNull(),
    status: text("status", { enum: ["open", "resolved"] })
      .notNull()
      .default("open"),
    authorId: text("author_id")
      .notNull()
      .references(() => users.id),
    resolvedBy: text("resolved_by").references(() => users.id, { onDelete: "set null" }),
    resolvedAt: integer("resolved_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [index("threads_design_idx").on(t.designId)],
);

export const comments = sqliteTable(
  "comments",
  {
    id: text("id").primaryKey(),
    threadId: text("thread_id")
      .notNull()
      .references(() => threads.id, { onDelete: "cascade" }),
    authorId: text("author_id")
      .notNull()
      .references(() => users.id),
    body: text("body").notNull(),
    /** User ids mentioned with @name or @email. */
    mentions: text("mentions", { mode: "json" }).$type<string[]>().notNull(),
    createdAt: createdAt(),
  },
  (t) => [index("comments_thread_idx").on(t.threadId)],
);

/** Workflow decisions. Append-only: triggers in the migration refuse UPDATE and DELETE. */
export const decisions = sqliteTable(
  "decisions",
  {
    id: text("id").primaryKey(),
    revisionId: text("revision_id")
      .notNull()
      .references(() => revisions.id),
    action: text("action", { enum: DECISION_ACTIONS }).notNull(),
    fromStatus: text("from_status", { enum: REVISION_STATUSES }).notNull(),
    toStatus: text("to_status", { enum: REVISION_STATUSES }).notNull(),
    actorId: text("actor_id")
      .notNull()
      .references(() => users.id),
    /** Names at the time of the decision, kept with it. */
    actorName: text("actor_name").notNull(),
    revisionHash: text("revision_hash").notNull(),
    yieldRunId: text("yield_run_id").references(() => yieldRuns.id),
    note: text("note").notNull().default(""),
    at: integer("at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [index("decisions_revision_idx").on(t.revisionId)],
);

/** Release records: one per released revision, with the snapshot that was signed off. */
export const releases = sqliteTable(
  "releases",
  {
    id: text("id").primaryKey(),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id),
    revisionId: text("revision_id")
      .notNull()
      .unique()
      .references(() => revisions.id),
    designId: text("design_id")
      .notNull()
      .references(() => designs.id),
    programId: text("program_id")
      .notNull()
      .references(() => programs.id),
    yieldRunId: text("yield_run_id")
      .notNull()
      .references(() => yieldRuns.id),
    releasedBy: text("released_by")
      .notNull()
      .references(() => users.id),
    releasedAt: integer("released_at", { mode: "timestamp_ms" }).notNull(),
    snapshot: text("snapshot", { mode: "json" }).$type<unknown>().notNull(),
  },
  (t) => [index("releases_workspace_idx").on(t.workspaceId)],
);
