// The review workflow: states, who may move a revision between them, the release gate, and release records.
//
//   draft ──submit──▶ in_review ──request_changes──▶ changes_requested ──submit──▶ in_review
//                         │
//                         └──approve (gate)──▶ approved ──release──▶ released
//   withdraw: the author (designer) from draft, in_review or changes_requested; an approver from any state but withdrawn.
//
// Every transition is one better-sqlite3 transaction: read the state, check, UPDATE ... WHERE status = <the state
// read>, append the decision and the audit entry. Of two racing requests exactly one changes the row; the other
// sees the new state (or zero changed rows) and gets 409.
import { and, asc, desc, eq, max } from "drizzle-orm";
import {
  PROTECTIVE_CAUTION,
  evaluateSpec,
  nominalEnvelopeValues,
  type Design,
  type SpecMask,
  type YieldResult,
} from "@stackproof/optics";
import type { AuthContext } from "../auth/types.ts";
import type { MailDeps } from "./deps.ts";
import {
  decisions,
  releases,
  revisions,
  yieldRuns,
  type DecisionAction,
  type EvidenceRuleField,
  type RevisionStatus,
} from "../db/schema.ts";
import { recordAudit, type DbOrTx } from "../lib/audit.ts";
import { HttpError, conflict, forbidden } from "../lib/errors.ts";
import { newId } from "./canonical.ts";
import {
  loadRevision,
  maskOf,
  person,
  stackOf,
  userNames,
  type RevisionContext,
  type YieldRunRow,
} from "./load.ts";
import { mailApproved, mailChangesRequested, mailReleased, mailReviewRequested } from "./notify.ts";
import { openBlockingThreads, threadsForRevision } from "./threads.ts";
import { describeErrorModel } from "./release-record.ts";
import {
  deviationState,
  deviationView,
  evidenceFigures,
  evidencePlan,
  pickEvidenceRun,
  SEED_RULE,
  type DeviationView,
  type EvidenceFigures,
} from "./evidence.ts";
import { RULE_LABEL, currentRuleSetters } from "./programs.ts";

export type GateCheckId =
  "verified_yield" | "spec_deviation" | "blocking_threads" | "independent_approver" | "state";

export interface GateCheck {
  id: GateCheckId;
  ok: boolean;
  message: string;
}

/** What the gate shows of the evidence: the rules, the assigned run and, when it is done, its figures. */
export interface GateEvidence {
  programVersion: number;
  targetYield: number;
  confidence: number;
  minTrials: number;
  seed: string;
  seedRule: string;
  errorModelVersion: string;
  /** The program's error model (the evidence run's) in plain words. */
  errorModelText: string;
  run: { id: string; status: string; trials: number; engineVersion: string } | null;
  figures: EvidenceFigures | null;
}

export interface GateDeviation {
  required: boolean;
  accepted: boolean;
  bands: { id: string; change: string }[];
  current: DeviationView | null;
}

export interface Gate {
  checks: GateCheck[];
  canApprove: boolean;
  canRelease: boolean;
  /** The evidence run when it satisfies the yield check. */
  yieldRun: YieldRunRow | null;
  evidence: GateEvidence;
  deviation: GateDeviation;
}

const pct = (x: number) => `${(x * 100).toFixed(1)} %`;
const pct2 = (x: number) => `${(x * 100).toFixed(2)} %`;

/** The release gate of a revision for the signed-in member. `yieldRunId` pins the yield check to one run. */
export function evaluateGate(db: DbOrTx, rc: RevisionContext, auth: AuthContext, yieldRunId?: string): Gate {
  const runs = db
    .select()
    .from(yieldRuns)
    .where(eq(yieldRuns.revisionId, rc.revision.id))
    .orderBy(desc(yieldRuns.createdAt), desc(yieldRuns.id))
    .all();
  const dev = deviationState(db, rc);
  const names = userNames(db, [dev.current?.requestedBy, dev.current?.decidedBy]);
  return gateOf(rc, auth, runs, openBlockingThreads(db, rc), {
    yieldRunId,
    latestNumber: latestNumberOf(db, rc.revision.designId),
    deviation: {
      required: dev.required,
      accepted: dev.accepted,
      bands: dev.bands,
      current: dev.current ? deviationView(dev.current, names) : null,
    },
    ruleSetters: currentRuleSetters(db, rc.program),
  });
}

/** The number of the newest revision of a design. */
export function latestNumberOf(db: DbOrTx, designId: string): number {
  return (
    db
      .select({ n: max(revisions.number) })
      .from(revisions)
      .where(eq(revisions.designId, designId))
      .get()?.n ?? 0
  );
}

export interface GateInputs {
  /** Pin the yield check to this run (it must be the evidence run). */
  yieldRunId?: string | undefined;
  /** Number of the design's newest revision; a revision older than it is superseded (default: this one). */
  latestNumber?: number;
  deviation: GateDeviation;
  /** Members who set an evidence rule in force (see currentRuleSetters). */
  ruleSetters: Map<string, EvidenceRuleField[]>;
}

/**
 * The gate from rows already loaded: `runs` are the revision's yield runs; `blocking` the open blocking threads that
 * count against it. Lists load these in bulk and call this directly.
 */
export function gateOf(
  rc: RevisionContext,
  auth: AuthContext,
  runs: readonly YieldRunRow[],
  blocking: readonly { revisionNumber: number }[],
  inputs: GateInputs,
): Gate {
  const { revision, program } = rc;
  const { yieldRunId, latestNumber, deviation } = inputs;
  const plan = evidencePlan(rc);
  const target = program.targetYield;
  const run = pickEvidenceRun(runs, plan);
  const result = run?.status === "done" ? (run.result as YieldResult | null) : null;
  const figures = result ? evidenceFigures(result, program) : null;
  const rules = `lower ${pct(program.confidence)} Wilson bound ≥ target ${pct(target)} with at least ${program.minEvidenceTrials} trials`;
  let yieldCheck: GateCheck;
  if (yieldRunId !== undefined && yieldRunId !== run?.id) {
    const pinned = runs.find((r) => r.id === yieldRunId);
    yieldCheck = {
      id: "verified_yield",
      ok: false,
      message: !pinned
        ? `Yield run ${yieldRunId} is not a run of revision ${revision.number}.`
        : `Yield run ${yieldRunId} is a what-if study (seed ${JSON.stringify(pinned.seed)}, ${pinned.trials} trials); only the evidence run (seed ${plan.seed}, ${plan.trials} trials) counts.`,
    };
  } else if (!run) {
    yieldCheck = {
      id: "verified_yield",
      ok: false,
      message: `No evidence run for revision ${revision.number} under program version ${program.version}; start it (${plan.trials} trials, server-assigned seed ${plan.seed}). Needed: ${rules}.`,
    };
  } else if (!figures) {
    yieldCheck = {
      id: "verified_yield",
      ok: false,
      message: `The evidence run ${run.id} is ${run.status} (${run.progressDone} of ${run.trials} trials).`,
    };
  } else if (!figures.pass) {
    yieldCheck = {
      id: "verified_yield",
      ok: false,
      message: `Evidence run: yield ${pct(figures.yield)} over ${figures.trials} trials, lower ${pct(figures.confidence)} bound ${pct2(figures.lowerBound)}, below the target ${pct(target)}.`,
    };
  } else {
    yieldCheck = {
      id: "verified_yield",
      ok: true,
      message: `Evidence run: yield ${pct(figures.yield)} over ${figures.trials} trials, lower ${pct(figures.confidence)} bound ${pct2(figures.lowerBound)} ≥ target ${pct(target)} (run ${run.id}).`,
    };
  }

  const bandList = deviation.bands.map((b) => `${b.id} ${b.change}`).join(", ");
  const deviationCheck: GateCheck = !deviation.required
    ? {
        id: "spec_deviation",
        ok: true,
        message: `The revision is judged against the program's mask (version ${program.version}).`,
      }
    : deviation.accepted
      ? {
          id: "spec_deviation",
          ok: true,
          message: `Spec deviation (${bandList}) accepted by ${deviation.current?.decidedBy?.name ?? "another member"}: ${deviation.current?.reason ?? ""}`,
        }
      : {
          id: "spec_deviation",
          ok: false,
          message:
            deviation.current?.status === "pending"
              ? `The revision's mask differs from the program's (${bandList}); the spec deviation asked for by ${deviation.current.requestedBy?.name ?? "a member"} awaits acceptance by someone else.`
              : deviation.current?.status === "rejected"
                ? `The revision's mask differs from the program's (${bandList}) and the spec deviation was rejected; save a revision with the program's mask.`
                : `The revision's mask differs from the program's (${bandList}); a spec deviation with a written reason, accepted by someone other than its author, is needed.`,
        };

  const blockingCheck: GateCheck =
    blocking.length === 0
      ? { id: "blocking_threads", ok: true, message: "No open blocking thread on this design." }
      : {
          id: "blocking_threads",
          ok: false,
          message: `${blocking.length} open blocking thread${blocking.length === 1 ? "" : "s"} (opened on revision ${[...new Set(blocking.map((t) => t.revisionNumber))].join(", ")}).`,
        };

  const isApprover = auth.roles.includes("approver");
  const isAuthor = auth.user.id === revision.authorId;
  const setFields = inputs.ruleSetters.get(auth.user.id);
  const approverCheck: GateCheck = !isApprover
    ? { id: "independent_approver", ok: false, message: "You do not hold the approver role." }
    : isAuthor
      ? {
          id: "independent_approver",
          ok: false,
          message: "You are the author of this revision; another approver must approve it.",
        }
      : setFields
        ? {
            id: "independent_approver",
            ok: false,
            message: `You set the ${setFields.map((f) => RULE_LABEL[f]).join(", ")} of program version ${program.version}; another approver must sign off against rules they did not set.`,
          }
        : {
            id: "independent_approver",
            ok: true,
            message:
              "You are an approver, not the author of this revision, and did not set the program's rules.",
          };

  const superseded = latestNumber !== undefined && latestNumber > revision.number;
  const stateCheck: GateCheck =
    revision.status !== "in_review"
      ? {
          id: "state",
          ok: false,
          message: `The revision ${STATE_PHRASE[revision.status] ?? `is ${revision.status}`}; only a revision in review can be approved.`,
        }
      : superseded
        ? {
            id: "state",
            ok: false,
            message: `Revision ${revision.number} is superseded by revision ${latestNumber}; only the latest revision of a design can be approved.`,
          }
        : { id: "state", ok: true, message: "The revision is in review." };

  const checks = [yieldCheck, deviationCheck, blockingCheck, approverCheck, stateCheck];
  return {
    checks,
    canApprove: checks.every((c) => c.ok),
    canRelease: revision.status === "approved" && isApprover && !superseded,
    yieldRun: yieldCheck.ok ? run : null,
    evidence: {
      programVersion: program.version,
      targetYield: target,
      confidence: program.confidence,
      minTrials: program.minEvidenceTrials,
      seed: plan.seed,
      seedRule: plan.seedRule,
      errorModelVersion: plan.errorModelVersion,
      errorModelText: describeErrorModel(plan.errorModel),
      run: run
        ? { id: run.id, status: run.status, trials: run.trials, engineVersion: run.engineVersion }
        : null,
      figures,
    },
    deviation,
  };
}

const NEXT: Record<DecisionAction, { from: readonly RevisionStatus[]; to: RevisionStatus }> = {
  submit: { from: ["draft", "changes_requested"], to: "in_review" },
  request_changes: { from: ["in_review"], to: "changes_requested" },
  approve: { from: ["in_review"], to: "approved" },
  release: { from: ["approved"], to: "released" },
  withdraw: { from: ["draft", "in_review", "changes_requested", "approved", "released"], to: "withdrawn" },
  // Written by updateProgram only (never requested through a transition).
  return_to_review: { from: ["approved"], to: "in_review" },
};

/** Actions refused on a revision that a newer revision of its design has superseded (withdrawing stays possible). */
const SUPERSEDE_CHECKED: readonly DecisionAction[] = ["submit", "approve", "release"];

const AUDIT_VERB: Record<DecisionAction, string> = {
  submit: "submitted for review",
  request_changes: "sent back with changes requested",
  approve: "approved",
  release: "released",
  withdraw: "withdrawn",
  return_to_review: "returned to review",
};

const AUDIT_SENTENCE: Record<DecisionAction, string> = {
  submit: "submitted",
  request_changes: "requested changes on",
  approve: "approved",
  release: "released",
  withdraw: "withdrew",
  return_to_review: "returned to review",
};

const AUDIT_ACTION: Record<DecisionAction, string> = {
  submit: "revision.submitted",
  request_changes: "revision.changes_requested",
  approve: "revision.approved",
  release: "revision.released",
  withdraw: "revision.withdrawn",
  return_to_review: "revision.returned_to_review",
};

/** 403 unless the member's roles allow `action` on this revision at all (state is checked afterwards). */
function checkRole(action: DecisionAction, auth: AuthContext, rc: RevisionContext) {
  const has = (r: "designer" | "reviewer" | "approver") => auth.roles.includes(r);
  switch (action) {
    case "submit":
      if (!has("designer")) throw forbidden("Submitting for review needs the designer role.");
      return;
    case "request_changes":
      if (!has("reviewer") && !has("approver"))
        throw forbidden("Requesting changes needs the reviewer or approver role.");
      return;
    case "approve":
    case "release":
      if (!has("approver"))
        throw forbidden(`${action === "approve" ? "Approving" : "Releasing"} needs the approver role.`);
      return;
    case "return_to_review":
      throw forbidden("A revision goes back to review only when its program changes.");
    case "withdraw":
      if (has("approver")) return;
      if (!has("designer")) throw forbidden("Withdrawing needs the designer (author) or approver role.");
      if (auth.user.id !== rc.revision.authorId)
        throw forbidden("Only the author or an approver may withdraw a revision.");
      if (!["draft", "in_review", "changes_requested"].includes(rc.revision.status)) {
        throw forbidden("A designer may withdraw only a draft or a revision in review; ask an approver.");
      }
      return;
  }
}

export interface TransitionInput {
  action: DecisionAction;
  note?: string;
  yieldRunId?: string;
}

export interface TransitionOutcome {
  revision: RevisionContext["revision"];
  decision: typeof decisions.$inferSelect;
  releaseId: string | null;
}

/**
 * Moves a revision through the workflow in one transaction (state check, decision, audit entry, release record),
 * then mails the people the step concerns.
 */
export function applyTransition(
  deps: MailDeps,
  auth: AuthContext,
  revisionId: string,
  input: TransitionInput,
): TransitionOutcome {
  const note = input.note?.trim() ?? "";
  const outcome = deps.db.transaction((tx) => {
    const rc = loadRevision(tx, auth.workspaceId, revisionId);
    checkRole(input.action, auth, rc);
    const from = rc.revision.status;
    const rule = NEXT[input.action];
    if (!rule.from.includes(from)) {
      throw conflict(`A revision that is ${from.replace("_", " ")} cannot be ${AUDIT_VERB[input.action]}.`, {
        status: from,
      });
    }
    if (SUPERSEDE_CHECKED.includes(input.action)) {
      const latestNumber = latestNumberOf(tx, rc.design.id);
      if (latestNumber > rc.revision.number) {
        throw new HttpError(
          409,
          "superseded",
          `Revision ${rc.revision.number} is superseded by revision ${latestNumber} of ${rc.design.name}; only the latest revision can be ${AUDIT_VERB[input.action]}.`,
          { status: from, latestNumber },
        );
      }
    }
    let yieldRunId: string | null = null;
    if (input.action === "approve") {
      const gate = evaluateGate(tx, rc, auth, input.yieldRunId);
      const failed = gate.checks.filter((c) => !c.ok);
      if (failed.length > 0) {
        throw new HttpError(
          422,
          "gate_failed",
          `Approval refused: ${failed.map((c) => c.message).join(" ")}`,
          { checks: failed },
        );
      }
      yieldRunId = gate.yieldRun?.id ?? null;
    }
    if (input.action === "release") {
      const approval = tx
        .select()
        .from(decisions)
        .where(and(eq(decisions.revisionId, rc.revision.id), eq(decisions.action, "approve")))
        .orderBy(desc(decisions.at))
        .get();
      yieldRunId = approval?.yieldRunId ?? null;
      if (!yieldRunId) throw conflict("This revision has no approval with a verified yield run to release.");
      // Approvals from before program versions existed count as version 1.
      const approvedAgainst = approval?.programVersion ?? 1;
      if (approvedAgainst !== rc.program.version) {
        throw new HttpError(
          409,
          "program_changed",
          `Revision ${rc.revision.number} was approved against program version ${approvedAgainst}; the program is now at version ${rc.program.version}. It needs a new sign-off.`,
          { approvedAgainst, programVersion: rc.program.version },
        );
      }
    }
    const at = new Date();
    const { decision } = recordDecision(tx, {
      workspaceId: auth.workspaceId,
      rc,
      action: input.action,
      to: rule.to,
      actor: auth.user,
      at,
      note,
      yieldRunId,
    });
    let releaseId: string | null = null;
    if (input.action === "release" && yieldRunId) {
      releaseId = storeRelease(tx, {
        rc: { ...rc, revision: { ...rc.revision, status: rule.to } },
        yieldRunId,
        releasedBy: auth,
        at,
      });
    }
    return { rc, decision, releaseId };
  });

  const actor = { id: auth.user.id, name: auth.user.name };
  const rc = outcome.rc;
  if (input.action === "submit") mailReviewRequested(deps, rc, actor, note);
  if (input.action === "request_changes") mailChangesRequested(deps, rc, actor, note);
  if (input.action === "approve") mailApproved(deps, rc, actor, note);
  if (input.action === "release" && outcome.releaseId) {
    const run = deps.db
      .select()
      .from(yieldRuns)
      .where(eq(yieldRuns.id, outcome.decision.yieldRunId ?? ""))
      .get();
    const result = run?.result ?? undefined;
    const yieldText = result
      ? `${pct(result.yield)} (95 % interval ${pct(result.interval.low)}–${pct(result.interval.high)}, ${result.trials} trials)`
      : "";
    mailReleased(deps, rc, actor, outcome.releaseId, yieldText);
  }
  const revision = deps.db.select().from(revisions).where(eq(revisions.id, revisionId)).get() ?? rc.revision;
  return { revision, decision: outcome.decision, releaseId: outcome.releaseId };
}

export interface DecisionInput {
  workspaceId: string;
  rc: RevisionContext;
  action: DecisionAction;
  to: RevisionStatus;
  actor: { id: string; name: string };
  at: Date;
  note: string;
  yieldRunId: string | null;
  /** The program version the decision is made against (default: the program's current one). */
  programVersion?: number;
}

/**
 * Records a workflow decision: moves the revision from the state it was read in to `to` (409 when it changed
 * meanwhile), appends the decision (decisions are never changed) and its audit entry. The caller has checked that
 * the move is allowed (applyTransition: roles, states, the gate).
 */
export function recordDecision(tx: DbOrTx, input: DecisionInput) {
  const { rc, action, to, actor, at, note, yieldRunId } = input;
  const from = rc.revision.status;
  const programVersion = input.programVersion ?? rc.program.version;
  const changed = tx
    .update(revisions)
    .set({ status: to, statusChangedAt: at })
    .where(and(eq(revisions.id, rc.revision.id), eq(revisions.status, from)))
    .run();
  if (changed.changes !== 1) throw conflict("The revision changed state meanwhile; reload it.");
  const decision = {
    id: newId(),
    revisionId: rc.revision.id,
    action,
    fromStatus: from,
    toStatus: to,
    actorId: actor.id,
    actorName: actor.name,
    revisionHash: rc.revision.hash,
    yieldRunId,
    programVersion,
    note,
    at,
  };
  tx.insert(decisions).values(decision).run();
  recordAudit(tx, {
    workspaceId: input.workspaceId,
    actorId: actor.id,
    action: AUDIT_ACTION[action],
    subjectType: "revision",
    subjectId: rc.revision.id,
    summary: `${actor.name} ${AUDIT_SENTENCE[action]} ${rc.design.name} rev ${rc.revision.number}${action === "submit" ? " for review" : ""}${note ? `: ${note.slice(0, 120)}` : ""}`,
    data: { from, to, revisionHash: rc.revision.hash, yieldRunId, programVersion, decisionId: decision.id },
  });
  return { decision, revision: { ...rc.revision, status: to, statusChangedAt: at } };
}

/**
 * Files the release record of a released revision: the snapshot (releaseSnapshot) taken now, so it reads the same
 * later. Returns the release id.
 */
export function storeRelease(
  tx: DbOrTx,
  input: { rc: RevisionContext; yieldRunId: string; releasedBy: AuthContext; at: Date },
): string {
  const { rc, yieldRunId, releasedBy, at } = input;
  const id = newId();
  tx.insert(releases)
    .values({
      id,
      workspaceId: releasedBy.workspaceId,
      revisionId: rc.revision.id,
      designId: rc.design.id,
      programId: rc.program.id,
      yieldRunId,
      releasedBy: releasedBy.user.id,
      releasedAt: at,
      snapshot: releaseSnapshot(tx, rc, yieldRunId, id, releasedBy, at),
    })
    .run();
  return id;
}

export function decisionViews(db: DbOrTx, revisionId: string) {
  return db
    .select()
    .from(decisions)
    .where(eq(decisions.revisionId, revisionId))
    .orderBy(asc(decisions.at), asc(decisions.id))
    .all()
    .map((d) => ({
      id: d.id,
      action: d.action,
      fromStatus: d.fromStatus,
      toStatus: d.toStatus,
      actor: { id: d.actorId, name: d.actorName },
      at: d.at.toISOString(),
      revisionHash: d.revisionHash,
      yieldRunId: d.yieldRunId,
      programVersion: d.programVersion ?? null,
      note: d.note,
    }));
}

/** What the release record shows; stored with the release so that it reads the same later. */
export function releaseSnapshot(
  db: DbOrTx,
  rc: RevisionContext,
  yieldRunId: string,
  releaseId: string,
  auth: AuthContext,
  at: Date,
) {
  const run = db.select().from(yieldRuns).where(eq(yieldRuns.id, yieldRunId)).get();
  const result = run?.result ?? undefined;
  const mask = maskOf(rc.revision, rc.program);
  const nominal = evaluateSpec(stackOf(rc.revision), mask);
  const dev = deviationState(db, rc);
  const devNames = userNames(db, [dev.current?.requestedBy, dev.current?.decidedBy]);
  const threads = threadsForRevision(db, rc);
  const names = userNames(db, [rc.revision.authorId, ...threads.map((t) => t.authorId)]);
  return {
    id: releaseId,
    releasedAt: at.toISOString(),
    releasedBy: { id: auth.user.id, name: auth.user.name },
    workspace: { id: auth.workspaceId, name: auth.workspaceName },
    program: {
      id: rc.program.id,
      name: rc.program.name,
      customer: rc.program.customer,
      application: rc.program.application,
      description: rc.program.description,
      protective: rc.program.protective,
      targetYield: rc.program.targetYield,
      version: rc.program.version,
      minEvidenceTrials: rc.program.minEvidenceTrials,
      confidence: rc.program.confidence,
      specMask: rc.program.specMask,
    },
    design: { id: rc.design.id, name: rc.design.name },
    revision: {
      id: rc.revision.id,
      number: rc.revision.number,
      hash: rc.revision.hash,
      note: rc.revision.note,
      author: person(names, rc.revision.authorId),
      createdAt: rc.revision.createdAt.toISOString(),
      stack: rc.revision.stack,
      specMask: mask,
    },
    nominal: { pass: nominal.pass, bands: nominal.bands },
    yieldRun:
      run && result
        ? {
            id: run.id,
            trials: run.trials,
            seed: run.seed,
            errorModel: run.errorModel,
            yield: result.yield,
            passCount: result.passCount,
            interval: result.interval,
            bandFailures: result.bandFailures,
            criticalLayers: result.criticalLayers.slice(0, 5),
            engineVersion: run.engineVersion,
            verified: run.verified,
            clientVerified: run.clientResult !== null && run.clientResult !== undefined,
            finishedAt: run.finishedAt ? run.finishedAt.toISOString() : null,
          }
        : null,
    /** The evidence as the gate read it: the run's kind, the seed rule, and the bound at the program's confidence. */
    evidence:
      run && result
        ? {
            kind: run.kind,
            programVersion: run.programVersion ?? rc.program.version,
            seedRule: SEED_RULE,
            figures: evidenceFigures(result, rc.program),
          }
        : null,
    deviation: {
      required: dev.required,
      bands: dev.bands,
      current: dev.current ? deviationView(dev.current, devNames) : null,
    },
    /** Nominal spectrum and the evidence run's 5–95 % envelope per (quantity, polarization, angle), for the plot. */
    plot: result ? plotSeries(stackOf(rc.revision), maskOf(rc.revision, rc.program), result) : [],
    decisions: decisionViews(db, rc.revision.id),
    threads: {
      total: threads.length,
      open: threads.filter((t) => t.status === "open").length,
      resolved: threads.filter((t) => t.status === "resolved").length,
      items: threads.map((t) => ({
        id: t.id,
        severity: t.severity,
        status: t.status,
        anchor: t.anchor,
        revisionNumber: t.revisionNumber,
        author: person(names, t.authorId),
      })),
    },
    caution: rc.program.protective ? PROTECTIVE_CAUTION : null,
  };
}

export type ReleaseSnapshot = ReturnType<typeof releaseSnapshot>;

export interface PlotSeries {
  quantity: string;
  polarization: string;
  angleDeg: number;
  /** The conditions in words (optics' band conditions: angle, angle range or cone, polarization). */
  conditions: string;
  wavelengths: number[];
  nominal: (number | null)[];
  low: (number | null)[] | null;
  high: (number | null)[] | null;
  lowP: number | null;
  highP: number | null;
}

/** The nominal curve at each envelope's wavelengths and conditions, with the 5th and 95th percentile curves of the run. */
function plotSeries(design: Design, mask: SpecMask, result: YieldResult): PlotSeries[] {
  const finite = (x: number) => (Number.isFinite(x) ? x : null);
  const envelopes = result.envelopes ?? [];
  let nominals: ReturnType<typeof nominalEnvelopeValues> = [];
  try {
    nominals = envelopes.length > 0 ? nominalEnvelopeValues(design, mask) : [];
  } catch {
    nominals = []; // a stored record whose design no longer evaluates still renders, without its nominal curve
  }
  return envelopes.map((env, e) => {
    const nominalValues = nominals[e]?.values;
    const nominal = env.wavelengths.map((_, i) => finite(nominalValues?.[i] ?? NaN));
    const pick = (target: number, fallback: "min" | "max") => {
      const exact = env.percentiles.find((p) => p.p === target);
      if (exact) return exact;
      const sorted = [...env.percentiles].sort((a, b) => a.p - b.p);
      return fallback === "min" ? sorted[0] : sorted.at(-1);
    };
    const lo = pick(5, "min");
    const hi = pick(95, "max");
    return {
      quantity: env.quantity,
      polarization: env.polarization,
      angleDeg: env.angleDeg,
      conditions: env.conditions,
      wavelengths: env.wavelengths,
      nominal,
      low: lo ? lo.values.map(finite) : null,
      high: hi ? hi.values.map(finite) : null,
      lowP: lo?.p ?? null,
      highP: hi?.p ?? null,
    };
  });
}

/** How the gate names a revision's state in a sentence ("The revision has changes requested"). */
const STATE_PHRASE: Record<string, string> = {
  draft: "is a draft",
  in_review: "is in review",
  changes_requested: "has changes requested",
  approved: "is already approved",
  released: "is already released",
  withdrawn: "is withdrawn",
};
