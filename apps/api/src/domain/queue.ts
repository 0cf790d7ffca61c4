// The per-role work queue: only the latest revision of each design, with the gate of revisions in review evaluated
// from rows loaded in bulk (a fixed number of queries whatever the size of the workspace).
import { and, desc, eq, inArray, max } from "drizzle-orm";
import type { AuthContext } from "../auth/types.ts";
import { designs, programs, revisions, threads, yieldRuns, type RevisionStatus } from "../db/schema.ts";
import type { DbOrTx } from "../lib/audit.ts";
import type { RevisionContext, ThreadRow, YieldRunRow } from "./load.ts";
import { revisionSummary, type RevisionSummary } from "./revisions.ts";
import { gateOf } from "./workflow.ts";
import { deviationStatesFor } from "./evidence.ts";
import { ruleSettersFor } from "./programs.ts";

/** Latest revision number of every design, as a subquery to join on. */
export function latestRevisionNumbers(db: DbOrTx) {
  return db
    .select({ designId: revisions.designId, latestNumber: max(revisions.number).as("latest_number") })
    .from(revisions)
    .groupBy(revisions.designId)
    .as("latest_revisions");
}

/** The latest revision of each design of the workspace whose status is one of `statuses`, most recently changed first. */
export function latestRevisionsIn(
  db: DbOrTx,
  workspaceId: string,
  statuses: readonly RevisionStatus[],
): RevisionContext[] {
  const latest = latestRevisionNumbers(db);
  return db
    .select({ revision: revisions, design: designs, program: programs })
    .from(revisions)
    .innerJoin(designs, eq(revisions.designId, designs.id))
    .innerJoin(programs, eq(designs.programId, programs.id))
    .innerJoin(
      latest,
      and(eq(latest.designId, revisions.designId), eq(latest.latestNumber, revisions.number)),
    )
    .where(and(eq(programs.workspaceId, workspaceId), inArray(revisions.status, [...statuses])))
    .orderBy(desc(revisions.statusChangedAt), desc(revisions.createdAt), desc(revisions.id))
    .all();
}

function groupBy<T>(rows: readonly T[], key: (row: T) => string): Map<string, T[]> {
  const out = new Map<string, T[]>();
  for (const r of rows) {
    const k = key(r);
    const list = out.get(k);
    if (list) list.push(r);
    else out.set(k, [r]);
  }
  return out;
}

export interface WorkQueue {
  changesRequested: RevisionSummary[];
  reviewRequested: RevisionSummary[];
  readyForDecision: RevisionSummary[];
  readyForRelease: RevisionSummary[];
}

/**
 * What waits for the signed-in member, by role (a revision superseded by a newer one of its design is in no list):
 * - changesRequested (designer): my revisions with changes requested;
 * - reviewRequested (reviewer): revisions in review that I did not author;
 * - readyForDecision (approver): revisions in review whose whole gate passes for me;
 * - readyForRelease (approver): approved revisions.
 */
export function workQueue(db: DbOrTx, auth: AuthContext): WorkQueue {
  const has = (r: string) => auth.roles.some((x) => x === r);
  const wanted: RevisionStatus[] = [];
  if (has("designer")) wanted.push("changes_requested");
  if (has("reviewer") || has("approver")) wanted.push("in_review");
  if (has("approver")) wanted.push("approved");
  const rows = wanted.length > 0 ? latestRevisionsIn(db, auth.workspaceId, wanted) : [];
  const mine = (rc: RevisionContext) => rc.revision.authorId === auth.user.id;

  const changes = has("designer")
    ? rows.filter((rc) => rc.revision.status === "changes_requested" && mine(rc))
    : [];
  const inReview = rows.filter((rc) => rc.revision.status === "in_review");
  const review = has("reviewer") ? inReview.filter((rc) => !mine(rc)) : [];
  // An approver never passes the independence check on their own revision, so those need no gate.
  const candidates = has("approver") ? inReview.filter((rc) => !mine(rc)) : [];
  let decision: RevisionContext[] = [];
  if (candidates.length > 0) {
    const runs = groupBy(
      db
        .select()
        .from(yieldRuns)
        .where(
          and(
            inArray(
              yieldRuns.revisionId,
              candidates.map((rc) => rc.revision.id),
            ),
            eq(yieldRuns.status, "done"),
            eq(yieldRuns.kind, "evidence"),
          ),
        )
        .orderBy(desc(yieldRuns.createdAt), desc(yieldRuns.id))
        .all(),
      (r: YieldRunRow) => r.revisionId,
    );
    const blocking = groupBy(
      db
        .select()
        .from(threads)
        .where(
          and(
            inArray(threads.designId, [...new Set(candidates.map((rc) => rc.design.id))]),
            eq(threads.status, "open"),
            eq(threads.severity, "blocking"),
          ),
        )
        .all(),
      (t: ThreadRow) => t.designId,
    );
    const deviations = deviationStatesFor(db, candidates);
    const setters = ruleSettersFor(
      db,
      candidates.map((rc) => rc.program),
    );
    decision = candidates.filter((rc) => {
      const counting = (blocking.get(rc.design.id) ?? []).filter(
        (t) => t.revisionNumber <= rc.revision.number,
      );
      const dev = deviations.get(rc.revision.id);
      return gateOf(rc, auth, runs.get(rc.revision.id) ?? [], counting, {
        deviation: {
          required: dev?.required ?? false,
          accepted: dev?.accepted ?? false,
          bands: dev?.bands ?? [],
          current: null,
        },
        ruleSetters: setters.get(rc.program.id) ?? new Map(),
      }).canApprove;
    });
  }
  const release = has("approver") ? rows.filter((rc) => rc.revision.status === "approved") : [];

  const summaries = new Map(revisionSummary(db, rows).map((s) => [s.id, s]));
  const view = (list: RevisionContext[]) =>
    list.map((rc) => summaries.get(rc.revision.id)).filter((s): s is RevisionSummary => s !== undefined);
  return {
    changesRequested: view(changes),
    reviewRequested: view(review),
    readyForDecision: view(decision),
    readyForRelease: view(release),
  };
}
