// Programs and their versions. A change of an evidence rule (mask, error model, target yield, minimum evidence
// trials, confidence) makes a new program version, audited with old and new values; an approved revision of the
// program goes back to review, because its approval was made against rules that no longer hold.
import { and, asc, eq, inArray } from "drizzle-orm";
import {
  EVIDENCE_RULE_FIELDS,
  decisions,
  designs,
  programVersions,
  programs,
  revisions,
  type EvidenceRuleField,
  type RuleChange,
  type StudyDefaults,
} from "../db/schema.ts";
import type { ErrorModel, SpecMask } from "@stackproof/optics";
import { recordAudit, type DbOrTx } from "../lib/audit.ts";
import { conflict } from "../lib/errors.ts";
import { canonicalJson, newId } from "./canonical.ts";
import { loadProgram, type ProgramRow } from "./load.ts";
import type { Actor } from "./deps.ts";

export type ProgramVersionRow = typeof programVersions.$inferSelect;

export type { Actor };

export interface ProgramInput {
  name: string;
  customer: string;
  description: string;
  application: string;
  protective: boolean;
  targetYield: number;
  minEvidenceTrials: number;
  confidence: number;
  specMask: SpecMask;
  errorModel: ErrorModel;
  studyDefaults: StudyDefaults;
}

const RULE_LABEL: Record<EvidenceRuleField, string> = {
  specMask: "spec mask",
  errorModel: "error model",
  targetYield: "target yield",
  minEvidenceTrials: "minimum evidence trials",
  confidence: "confidence",
};

/** One sentence for a rule change: scalars as "from → to", masks and models by name only. */
function describeChange(field: EvidenceRuleField, c: RuleChange): string {
  const fmt = (v: unknown) =>
    field === "targetYield" || field === "confidence"
      ? `${((v as number) * 100).toFixed(2).replace(/\.?0+$/, "")} %`
      : String(v);
  return field === "specMask" || field === "errorModel"
    ? RULE_LABEL[field]
    : `${RULE_LABEL[field]} ${fmt(c.before)} → ${fmt(c.after)}`;
}

/** Creates a program at version 1 (its first program_versions row) with the audit entry; returns its id. */
export function createProgram(
  db: DbOrTx,
  input: { workspaceId: string; actor: Actor; program: ProgramInput },
): string {
  return db.transaction((tx) => createProgramIn(tx, input));
}

/**
 * Stores a new program at version 1 with its first program_versions row ("program created"), as of `at`. No audit
 * entry: createProgram writes one; the demo seeder (which back-dates its programs) calls this directly.
 */
export function storeProgram(
  db: DbOrTx,
  input: { workspaceId: string; createdBy: string; program: ProgramInput; at?: Date },
): ProgramRow {
  const id = newId();
  const at = input.at ?? new Date();
  const p = input.program;
  db.insert(programs)
    .values({
      id,
      workspaceId: input.workspaceId,
      ...p,
      version: 1,
      createdBy: input.createdBy,
      createdAt: at,
    })
    .run();
  db.insert(programVersions)
    .values({
      id: newId(),
      programId: id,
      version: 1,
      targetYield: p.targetYield,
      minEvidenceTrials: p.minEvidenceTrials,
      confidence: p.confidence,
      specMask: p.specMask,
      errorModel: p.errorModel,
      changes: {},
      changedBy: null,
      note: "program created",
      createdAt: at,
    })
    .run();
  return db.select().from(programs).where(eq(programs.id, id)).get() as ProgramRow;
}

function createProgramIn(
  db: DbOrTx,
  input: { workspaceId: string; actor: Actor; program: ProgramInput },
): string {
  const p = input.program;
  const { id } = storeProgram(db, { workspaceId: input.workspaceId, createdBy: input.actor.id, program: p });
  recordAudit(db, {
    workspaceId: input.workspaceId,
    actorId: input.actor.id,
    action: "program.created",
    subjectType: "program",
    subjectId: id,
    summary: `${input.actor.name} created the program ${p.name} (target ${(p.targetYield * 100).toFixed(1)} %, ${p.minEvidenceTrials} evidence trials, ${(p.confidence * 100).toFixed(1)} % confidence)`,
    data: {
      version: 1,
      targetYield: p.targetYield,
      minEvidenceTrials: p.minEvidenceTrials,
      confidence: p.confidence,
    },
  });
  return id;
}

export interface ProgramUpdate {
  workspaceId: string;
  actor: Actor;
  /** The program to edit (404 when it is not in the workspace). */
  programId: string;
  changes: Partial<ProgramInput>;
  /** Why the rules changed (kept with the version). */
  note?: string;
}

/**
 * Apply a program edit. Returns the new version number when an evidence rule changed (else null). Approved
 * revisions of the program go back to in_review with a `return_to_review` decision by the editor.
 */
export function updateProgram(db: DbOrTx, u: ProgramUpdate): { version: number | null; returned: string[] } {
  return db.transaction((tx) => updateProgramIn(tx, u, loadProgram(tx, u.workspaceId, u.programId)));
}

function updateProgramIn(
  db: DbOrTx,
  u: ProgramUpdate,
  before: ProgramRow,
): { version: number | null; returned: string[] } {
  const { actor } = u;
  const ruleChanges: Partial<Record<EvidenceRuleField, RuleChange>> = {};
  for (const f of EVIDENCE_RULE_FIELDS) {
    const next = u.changes[f];
    if (next === undefined) continue;
    if (canonicalJson(next) !== canonicalJson(before[f])) ruleChanges[f] = { before: before[f], after: next };
  }
  const otherKeys = (Object.keys(u.changes) as (keyof ProgramInput)[]).filter(
    (k) => !(EVIDENCE_RULE_FIELDS as readonly string[]).includes(k) && u.changes[k] !== undefined,
  );
  const otherBefore = Object.fromEntries(otherKeys.map((k) => [k, before[k]]));
  const otherAfter = Object.fromEntries(otherKeys.map((k) => [k, u.changes[k]]));
  const ruleFields = Object.keys(ruleChanges) as EvidenceRuleField[];
  const version = ruleFields.length > 0 ? before.version + 1 : null;
  const at = new Date();
  const set: Partial<typeof programs.$inferInsert> = { ...otherAfter };
  for (const f of ruleFields) (set as Record<string, unknown>)[f] = ruleChanges[f]?.after;
  if (version !== null) set.version = version;
  if (Object.keys(set).length === 0) return { version: null, returned: [] };
  const changed = db
    .update(programs)
    .set(set)
    .where(and(eq(programs.id, before.id), eq(programs.version, before.version)))
    .run();
  if (changed.changes !== 1) throw conflict("The program changed meanwhile; reload it.");
  const returned: string[] = [];
  if (version !== null) {
    const after = { ...before, ...set } as ProgramRow;
    db.insert(programVersions)
      .values({
        id: newId(),
        programId: before.id,
        version,
        targetYield: after.targetYield,
        minEvidenceTrials: after.minEvidenceTrials,
        confidence: after.confidence,
        specMask: after.specMask,
        errorModel: after.errorModel,
        changes: ruleChanges,
        changedBy: actor.id,
        note: u.note ?? "",
        createdAt: at,
      })
      .run();
    // Approvals made against the previous rules no longer hold: send those revisions back to review.
    const approved = db
      .select({ revision: revisions, designName: designs.name })
      .from(revisions)
      .innerJoin(designs, eq(revisions.designId, designs.id))
      .where(and(eq(designs.programId, before.id), eq(revisions.status, "approved")))
      .orderBy(asc(revisions.createdAt))
      .all();
    for (const { revision, designName } of approved) {
      const res = db
        .update(revisions)
        .set({ status: "in_review", statusChangedAt: at })
        .where(and(eq(revisions.id, revision.id), eq(revisions.status, "approved")))
        .run();
      if (res.changes !== 1) continue;
      const note = `Program ${before.name} changed to version ${version} (${ruleFields.map((f) => describeChange(f, ruleChanges[f] as RuleChange)).join("; ")}); the approval no longer holds.`;
      const decisionId = newId();
      db.insert(decisions)
        .values({
          id: decisionId,
          revisionId: revision.id,
          action: "return_to_review",
          fromStatus: "approved",
          toStatus: "in_review",
          actorId: actor.id,
          actorName: actor.name,
          revisionHash: revision.hash,
          yieldRunId: null,
          programVersion: version,
          note,
          at,
        })
        .run();
      recordAudit(db, {
        workspaceId: u.workspaceId,
        actorId: actor.id,
        action: "revision.returned_to_review",
        subjectType: "revision",
        subjectId: revision.id,
        summary: `${designName} rev ${revision.number} went back to review: ${note}`,
        data: { decisionId, programVersion: version },
      });
      returned.push(revision.id);
    }
  }
  const allBefore = { ...otherBefore } as Record<string, unknown>;
  const allAfter = { ...otherAfter } as Record<string, unknown>;
  for (const f of ruleFields) {
    allBefore[f] = ruleChanges[f]?.before;
    allAfter[f] = ruleChanges[f]?.after;
  }
  const parts = [
    ...ruleFields.map((f) => describeChange(f, ruleChanges[f] as RuleChange)),
    ...otherKeys.map((k) => String(k)),
  ];
  recordAudit(db, {
    workspaceId: u.workspaceId,
    actorId: actor.id,
    action: "program.updated",
    subjectType: "program",
    subjectId: before.id,
    summary: `${actor.name} changed ${parts.join(", ")} of the program ${before.name}${version !== null ? ` (now version ${version})` : ""}${returned.length ? `; ${returned.length} approved revision${returned.length === 1 ? "" : "s"} went back to review` : ""}`,
    data: {
      before: allBefore,
      after: allAfter,
      fromVersion: before.version,
      version: version ?? before.version,
      returnedToReview: returned,
    },
  });
  return { version, returned };
}

export function programVersionsOf(db: DbOrTx, programId: string): ProgramVersionRow[] {
  return db
    .select()
    .from(programVersions)
    .where(eq(programVersions.programId, programId))
    .orderBy(asc(programVersions.version))
    .all();
}

/**
 * Members who set an evidence rule now in force (from version 2 on: creating a program is not a change). They may
 * not sign off a revision against the current version (separation of duties).
 */
export function currentRuleSetters(db: DbOrTx, program: ProgramRow): Map<string, EvidenceRuleField[]> {
  return ruleSettersOf(program, programVersionsOf(db, program.id));
}

/** currentRuleSetters for many programs from one query (lists). */
export function ruleSettersFor(
  db: DbOrTx,
  list: readonly ProgramRow[],
): Map<string, Map<string, EvidenceRuleField[]>> {
  const ids = [...new Set(list.map((p) => p.id))];
  const out = new Map<string, Map<string, EvidenceRuleField[]>>();
  if (ids.length === 0) return out;
  const rows = db
    .select()
    .from(programVersions)
    .where(inArray(programVersions.programId, ids))
    .orderBy(asc(programVersions.version))
    .all();
  for (const p of list) {
    if (!out.has(p.id))
      out.set(
        p.id,
        ruleSettersOf(
          p,
          rows.filter((r) => r.programId === p.id),
        ),
      );
  }
  return out;
}

function ruleSettersOf(program: ProgramRow, versions: readonly ProgramVersionRow[]) {
  const setters = new Map<string, EvidenceRuleField[]>();
  // Creating a program sets every rule of version 1: its creator is their setter until someone changes them.
  const lastSetBy = new Map<EvidenceRuleField, string | null>(
    EVIDENCE_RULE_FIELDS.map((f) => [f, program.createdBy ?? null]),
  );
  for (const v of versions) {
    if (v.version > program.version) break;
    for (const f of Object.keys(v.changes) as EvidenceRuleField[]) lastSetBy.set(f, v.changedBy);
  }
  for (const [f, who] of lastSetBy) {
    if (!who) continue;
    setters.set(who, [...(setters.get(who) ?? []), f]);
  }
  return setters;
}

export { RULE_LABEL };
