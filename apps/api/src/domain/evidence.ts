// Evidence rules: which yield run is the evidence for a revision, what the gate reads from it, and spec deviations.
//
// The evidence run of a revision under its program's current rules is fixed by rule, not chosen by anyone:
//   seed   = "ev-" + first 16 hex digits of the revision's content hash + "-m" + the error model's fingerprint
//   trials = the program's minimum evidence trials
//   model  = the program's error model
// The error-model fingerprint (first 8 hex digits of the sha-256 of its canonical JSON) is the error model's version
// by content: the same revision under the same model always gets the same seed, and switching the model away and
// back cannot produce a fresh seed to try. Every other run is a what-if study and never counts.
import { createHash } from "node:crypto";
import { and, asc, eq, inArray } from "drizzle-orm";
import {
  ENGINE_VERSION,
  parseYieldStudy,
  wilsonLowerBound,
  type ErrorModel,
  type SpecBand,
  type SpecColour,
  type SpecMask,
  type YieldResult,
} from "@stackproof/optics";
import { specDeviations, yieldRuns } from "../db/schema.ts";
import { recordAudit, type DbOrTx } from "../lib/audit.ts";
import { HttpError, conflict, forbidden } from "../lib/errors.ts";
import { ClientResultSchema, verifyClientResult } from "../yield/verify.ts";
import { canonicalJson, newId } from "./canonical.ts";
import {
  loadRevision,
  maskOf,
  stackOf,
  type ProgramRow,
  type RevisionContext,
  type YieldRunRow,
} from "./load.ts";

export const SEED_RULE =
  'seed = "ev-" + first 16 hex digits of the revision content hash + "-m" + first 8 hex digits of the sha-256 of the error model (canonical JSON); trials = the program\'s minimum evidence trials';

const sha256 = (s: string) => createHash("sha256").update(s).digest("hex");

/** Content version of an error model: first 8 hex digits of the sha-256 of its canonical JSON. */
export function errorModelFingerprint(model: unknown): string {
  return sha256(canonicalJson(model)).slice(0, 8);
}

/** The server-assigned seed of the evidence run for a revision content hash under an error model. */
export function evidenceSeed(revisionHash: string, errorModel: unknown): string {
  return `ev-${revisionHash.slice(0, 16)}-m${errorModelFingerprint(errorModel)}`;
}

export interface EvidencePlan {
  programVersion: number;
  seed: string;
  trials: number;
  errorModel: ErrorModel;
  errorModelVersion: string;
  confidence: number;
  targetYield: number;
  seedRule: string;
}

/** The parameters of the evidence run of a revision under its program's current rules. */
export function evidencePlan(rc: RevisionContext): EvidencePlan {
  const errorModelVersion = errorModelFingerprint(rc.program.errorModel);
  return {
    programVersion: rc.program.version,
    seed: evidenceSeed(rc.revision.hash, rc.program.errorModel),
    trials: rc.program.minEvidenceTrials,
    errorModel: rc.program.errorModel as ErrorModel,
    errorModelVersion,
    confidence: rc.program.confidence,
    targetYield: rc.program.targetYield,
    seedRule: SEED_RULE,
  };
}

/** True when a run's seed, trials and error model are exactly those of the plan. */
export function matchesPlan(
  run: Pick<YieldRunRow, "seed" | "trials" | "errorModel">,
  plan: EvidencePlan,
): boolean {
  return (
    run.seed === plan.seed &&
    run.trials === plan.trials &&
    canonicalJson(run.errorModel) === canonicalJson(plan.errorModel)
  );
}

/**
 * THE evidence run of a revision under the current rules, from its runs: the oldest evidence run with the plan's
 * seed, trials and model that is queued, running or done (runs are deterministic, so any copy is the same).
 */
export function pickEvidenceRun(runs: readonly YieldRunRow[], plan: EvidencePlan): YieldRunRow | null {
  const live = runs
    .filter(
      (r) =>
        r.kind === "evidence" && matchesPlan(r, plan) && ["queued", "running", "done"].includes(r.status),
    )
    .sort((a, b) => a.createdAt.getTime() - b.createdAt.getTime() || (a.id < b.id ? -1 : 1));
  return live.find((r) => r.status === "done") ?? live[0] ?? null;
}

export function findEvidenceRun(db: DbOrTx, rc: RevisionContext): YieldRunRow | null {
  const runs = db
    .select()
    .from(yieldRuns)
    .where(and(eq(yieldRuns.revisionId, rc.revision.id), eq(yieldRuns.kind, "evidence")))
    .all();
  return pickEvidenceRun(runs, evidencePlan(rc));
}

/** What the gate, the overview and the release record show of a finished run against the rules. */
export interface EvidenceFigures {
  trials: number;
  passCount: number;
  yield: number;
  lowerBound: number;
  confidence: number;
  targetYield: number;
  minTrials: number;
  pass: boolean;
}

export function evidenceFigures(
  result: Pick<YieldResult, "trials" | "passCount" | "yield">,
  rules: Pick<ProgramRow, "confidence" | "targetYield" | "minEvidenceTrials">,
): EvidenceFigures {
  const lowerBound = wilsonLowerBound(result.passCount, result.trials, rules.confidence);
  return {
    trials: result.trials,
    passCount: result.passCount,
    yield: result.yield,
    lowerBound,
    confidence: rules.confidence,
    targetYield: rules.targetYield,
    minTrials: rules.minEvidenceTrials,
    pass: result.trials >= rules.minEvidenceTrials && lowerBound >= rules.targetYield,
  };
}

export interface EvidenceRequest {
  rc: RevisionContext;
  actor: { id: string; name: string };
  workspaceId: string;
  clientResult?: unknown;
}

/**
 * The evidence run of a revision, created when there is none (idempotent: asking again returns the same run).
 * A browser result is attached to a run that has none yet, so the server compares it when the run finishes.
 * Returns whether a new run was created; the caller enqueues it.
 */
export function requestEvidenceRun(db: DbOrTx, req: EvidenceRequest): { run: YieldRunRow; created: boolean } {
  return db.transaction((tx) => requestEvidenceRunIn(tx, req));
}

function requestEvidenceRunIn(db: DbOrTx, req: EvidenceRequest): { run: YieldRunRow; created: boolean } {
  const { rc, actor } = req;
  const plan = evidencePlan(rc);
  const existing = findEvidenceRun(db, rc);
  if (existing) {
    if (
      req.clientResult !== undefined &&
      (existing.clientResult === null || existing.clientResult === undefined)
    ) {
      // The first browser result is kept with the run and compared; the server's result stays the evidence.
      const set: Partial<typeof yieldRuns.$inferInsert> = {
        clientResult: req.clientResult as YieldRunRow["clientResult"],
      };
      if (existing.status === "done" && existing.result) {
        const parsed = ClientResultSchema.safeParse(req.clientResult);
        const v = parsed.success
          ? verifyClientResult(existing.result as YieldResult, parsed.data, {
              trials: existing.trials,
              seed: existing.seed,
              errorModel: existing.errorModel as ErrorModel,
            })
          : { verified: false, mismatch: "the submitted client result is not a yield result" };
        set.verified = v.verified;
        set.mismatch = v.mismatch;
      }
      db.update(yieldRuns).set(set).where(eq(yieldRuns.id, existing.id)).run();
    }
    const run = db.select().from(yieldRuns).where(eq(yieldRuns.id, existing.id)).get() as YieldRunRow;
    return { run, created: false };
  }
  try {
    parseYieldStudy({
      design: stackOf(rc.revision),
      mask: maskOf(rc.revision, rc.program),
      errorModel: plan.errorModel,
      trials: plan.trials,
      seed: plan.seed,
    });
  } catch (err) {
    if (err instanceof RangeError) throw new HttpError(400, "invalid_study", err.message);
    throw err;
  }
  const id = newId();
  db.insert(yieldRuns)
    .values({
      id,
      revisionId: rc.revision.id,
      requestedBy: actor.id,
      status: "queued",
      trials: plan.trials,
      seed: plan.seed,
      errorModel: plan.errorModel,
      clientResult: (req.clientResult ?? null) as YieldRunRow["clientResult"],
      engineVersion: ENGINE_VERSION,
      kind: "evidence",
      programVersion: plan.programVersion,
      createdAt: new Date(),
    })
    .run();
  recordAudit(db, {
    workspaceId: req.workspaceId,
    actorId: actor.id,
    action: "yield_run.evidence_started",
    subjectType: "yield_run",
    subjectId: id,
    summary: `${actor.name} started the evidence run (${plan.trials} trials, seed ${plan.seed}) of ${rc.design.name} rev ${rc.revision.number} under program version ${plan.programVersion}`,
    data: { seed: plan.seed, trials: plan.trials, programVersion: plan.programVersion },
  });
  return { run: db.select().from(yieldRuns).where(eq(yieldRuns.id, id)).get() as YieldRunRow, created: true };
}

// ---------------------------------------------------------------------------------------------------------------
// Spec deviations

/** The mask as stored (no protective flag), canonical. */
function maskKey(mask: unknown): string {
  const { protective: _p, ...rest } = (mask ?? {}) as SpecMask & { protective?: boolean };
  return canonicalJson(rest);
}

export function programMaskHash(program: ProgramRow): string {
  return sha256(maskKey(program.specMask));
}

/** Bands of the revision's mask that differ from the program's: added, removed or changed (by id). */
export function maskDifferences(
  revisionMask: unknown,
  programMask: unknown,
): { id: string; change: string }[] {
  // bands and colour requirements share ids, so both are compared entry by entry
  const bandsOf = (m: unknown) =>
    new Map(
      [...((m as SpecMask | null)?.bands ?? []), ...((m as SpecMask | null)?.colour ?? [])].map(
        (b: SpecBand | SpecColour) => [b.id, canonicalJson(b)],
      ),
    );
  const rev = bandsOf(revisionMask);
  const prog = bandsOf(programMask);
  const out: { id: string; change: string }[] = [];
  for (const [id, text] of prog) {
    const r = rev.get(id);
    if (r === undefined) out.push({ id, change: "removed" });
    else if (r !== text) out.push({ id, change: "changed" });
  }
  for (const id of rev.keys()) if (!prog.has(id)) out.push({ id, change: "added" });
  if (out.length === 0 && maskKey(revisionMask) !== maskKey(programMask))
    out.push({ id: "(mask)", change: "changed" });
  return out;
}

export type DeviationRow = typeof specDeviations.$inferSelect;

export interface DeviationState {
  /** True when the revision's mask differs from the program's current mask. */
  required: boolean;
  bands: { id: string; change: string }[];
  /** The deviation written against the current program mask (newest), if any. */
  current: DeviationRow | null;
  accepted: boolean;
}

export function deviationState(db: DbOrTx, rc: RevisionContext): DeviationState {
  return deviationStatesFor(db, [rc]).get(rc.revision.id) as DeviationState;
}

/** deviationState for many revisions from one query (lists). */
export function deviationStatesFor(
  db: DbOrTx,
  list: readonly RevisionContext[],
): Map<string, DeviationState> {
  const out = new Map<string, DeviationState>();
  const differing = list
    .map((rc) => ({ rc, bands: maskDifferences(rc.revision.specMask, rc.program.specMask) }))
    .filter((x) => {
      if (x.bands.length === 0)
        out.set(x.rc.revision.id, { required: false, bands: [], current: null, accepted: false });
      return x.bands.length > 0;
    });
  const rows = deviationsOf(
    db,
    differing.map((x) => x.rc.revision.id),
  );
  for (const { rc, bands } of differing) {
    const hash = programMaskHash(rc.program);
    // Newest first among those written against the program's current mask.
    const current =
      rows.filter((d) => d.revisionId === rc.revision.id && d.programMaskHash === hash).at(-1) ?? null;
    out.set(rc.revision.id, { required: true, bands, current, accepted: current?.status === "accepted" });
  }
  return out;
}

export function deviationsOf(db: DbOrTx, revisionIds: readonly string[]): DeviationRow[] {
  if (revisionIds.length === 0) return [];
  return db
    .select()
    .from(specDeviations)
    .where(inArray(specDeviations.revisionId, [...revisionIds]))
    .orderBy(asc(specDeviations.requestedAt), asc(specDeviations.id))
    .all();
}

/** A designer asks for the revision's mask to be accepted as a deviation from the program's mask. */
export function requestDeviation(
  db: DbOrTx,
  input: { revisionId: string; actor: { id: string; name: string }; workspaceId: string; reason: string },
): DeviationRow {
  return db.transaction((tx) =>
    requestDeviationIn(tx, { ...input, rc: loadRevision(tx, input.workspaceId, input.revisionId) }),
  );
}

function requestDeviationIn(
  db: DbOrTx,
  input: { rc: RevisionContext; actor: { id: string; name: string }; workspaceId: string; reason: string },
): DeviationRow {
  const { rc, actor } = input;
  const state = deviationState(db, rc);
  if (!state.required)
    throw conflict("The revision carries the program's mask; there is nothing to deviate from.");
  if (state.current && state.current.status !== "rejected")
    throw conflict(`A deviation for this revision is already ${state.current.status}.`, {
      deviationId: state.current.id,
    });
  if (["approved", "released", "withdrawn"].includes(rc.revision.status))
    throw conflict(`A revision that is ${rc.revision.status} cannot take a new deviation.`);
  const row = {
    id: newId(),
    revisionId: rc.revision.id,
    programVersion: rc.program.version,
    programMaskHash: programMaskHash(rc.program),
    bands: state.bands,
    reason: input.reason,
    requestedBy: actor.id,
    requestedAt: new Date(),
    status: "pending" as const,
  };
  db.insert(specDeviations).values(row).run();
  recordAudit(db, {
    workspaceId: input.workspaceId,
    actorId: actor.id,
    action: "deviation.requested",
    subjectType: "revision",
    subjectId: rc.revision.id,
    summary: `${actor.name} asked for a spec deviation on ${rc.design.name} rev ${rc.revision.number} (${state.bands.map((b) => `${b.id} ${b.change}`).join(", ")}): ${input.reason.slice(0, 160)}`,
    data: {
      deviationId: row.id,
      bands: state.bands,
      reason: input.reason,
      programVersion: rc.program.version,
    },
  });
  return db.select().from(specDeviations).where(eq(specDeviations.id, row.id)).get() as DeviationRow;
}

/** An approver other than the deviation's author (and the revision's author) accepts or rejects it. */
export function decideDeviation(
  db: DbOrTx,
  input: {
    revisionId: string;
    actor: { id: string; name: string; roles: readonly string[] };
    workspaceId: string;
    deviationId: string;
    accept: boolean;
    note: string;
  },
): DeviationRow {
  return db.transaction((tx) =>
    decideDeviationIn(tx, { ...input, rc: loadRevision(tx, input.workspaceId, input.revisionId) }),
  );
}

function decideDeviationIn(
  db: DbOrTx,
  input: {
    rc: RevisionContext;
    actor: { id: string; name: string; roles: readonly string[] };
    workspaceId: string;
    deviationId: string;
    accept: boolean;
    note: string;
  },
): DeviationRow {
  const { rc, actor } = input;
  const row = db
    .select()
    .from(specDeviations)
    .where(and(eq(specDeviations.id, input.deviationId), eq(specDeviations.revisionId, rc.revision.id)))
    .get();
  if (!row) throw new HttpError(404, "not_found", "No such deviation on this revision.");
  if (!actor.roles.includes("approver"))
    throw forbidden("Accepting or rejecting a deviation needs the approver role.");
  if (row.requestedBy === actor.id)
    throw forbidden("You asked for this deviation; someone else must accept or reject it.");
  if (rc.revision.authorId === actor.id)
    throw forbidden("You are the author of this revision; someone else must accept or reject its deviation.");
  if (row.status !== "pending")
    throw conflict(`The deviation is already ${row.status}.`, { status: row.status });
  if (row.programMaskHash !== programMaskHash(rc.program))
    throw conflict("The program's mask changed since this deviation was written; ask for a new one.");
  const status = input.accept ? ("accepted" as const) : ("rejected" as const);
  const at = new Date();
  const changed = db
    .update(specDeviations)
    .set({ status, decidedBy: actor.id, decidedAt: at, decisionNote: input.note })
    .where(and(eq(specDeviations.id, row.id), eq(specDeviations.status, "pending")))
    .run();
  if (changed.changes !== 1) throw conflict("The deviation changed meanwhile; reload it.");
  recordAudit(db, {
    workspaceId: input.workspaceId,
    actorId: actor.id,
    action: `deviation.${status}`,
    subjectType: "revision",
    subjectId: rc.revision.id,
    summary: `${actor.name} ${status} the spec deviation on ${rc.design.name} rev ${rc.revision.number}${input.note ? `: ${input.note.slice(0, 160)}` : ""}`,
    data: { deviationId: row.id, status, note: input.note },
  });
  return db.select().from(specDeviations).where(eq(specDeviations.id, row.id)).get() as DeviationRow;
}

export function deviationView(d: DeviationRow, names: Map<string, { id: string; name: string }>) {
  const who = (id: string | null) => (id ? (names.get(id) ?? { id, name: "(former member)" }) : null);
  return {
    id: d.id,
    revisionId: d.revisionId,
    programVersion: d.programVersion,
    bands: d.bands,
    reason: d.reason,
    requestedBy: who(d.requestedBy),
    requestedAt: d.requestedAt.toISOString(),
    status: d.status,
    decidedBy: who(d.decidedBy),
    decidedAt: d.decidedAt ? d.decidedAt.toISOString() : null,
    decisionNote: d.decisionNote,
  };
}
export type DeviationView = ReturnType<typeof deviationView>;
