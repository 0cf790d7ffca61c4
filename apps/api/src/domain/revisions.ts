// Creating revisions (immutable content + content hash) and the JSON views of programs, designs and revisions.
import { and, count, desc, eq, inArray, max } from "drizzle-orm";
import {
  SpecMaskSchema,
  checkDesignInputs,
  evaluateSpec,
  maskWavelengths,
  type Design,
  type SpecMask,
  type SpecResult,
  type YieldResult,
} from "@stackproof/optics";
import { designs, revisions, threads, yieldRuns } from "../db/schema.ts";
import { deviationState, evidenceFigures, evidencePlan, pickEvidenceRun } from "./evidence.ts";
import type { StaleBase } from "@stackproof/contracts";
import { recordAudit, type DbOrTx } from "../lib/audit.ts";
import { HttpError } from "../lib/errors.ts";
import { assertWithinLimits, designLimitProblems, maskLimitProblems } from "../lib/limits.ts";
import { zodDetails } from "../lib/errors.ts";
import { newId, revisionHash } from "./canonical.ts";
import { resolveDesign } from "./materials.ts";
import type { Actor } from "./deps.ts";
import {
  maskOf,
  person,
  stackOf,
  userNames,
  type DesignRow,
  type ProgramRow,
  type RevisionContext,
  type RevisionRow,
  type YieldRunRow,
} from "./load.ts";

export function parseMask(input: unknown): SpecMask {
  const parsed = SpecMaskSchema.safeParse(input);
  if (!parsed.success) {
    const details = zodDetails(parsed.error);
    const first = details[0];
    throw new HttpError(
      400,
      "invalid_spec_mask",
      `Spec mask: ${first ? `${first.path || "mask"}: ${first.message}` : "invalid"}`,
      details,
    );
  }
  return parsed.data;
}

export interface NewRevision {
  workspaceId: string;
  design: DesignRow;
  program: ProgramRow;
  stack: unknown;
  specMask?: unknown;
  note: string;
  authorId: string;
  /** Set when the caller has already evaluated the design on the worker pool ({@link checkRevisionInput}). */
  evaluated?: boolean;
}

/** The stack (self-contained) and mask a new revision would store, and the mask it is evaluated against. */
export function revisionInput(
  db: DbOrTx,
  input: Pick<NewRevision, "workspaceId" | "program" | "stack" | "specMask">,
) {
  assertWithinLimits(designLimitProblems(input.stack));
  const stack = resolveDesign(db, input.workspaceId, input.stack);
  assertWithinLimits(maskLimitProblems(input.specMask ?? input.program.specMask));
  const mask = parseMask(input.specMask ?? input.program.specMask);
  // Physics inputs that could poison a verdict (n = 1e308, n ≤ 0, a 1e308 nm layer) are refused by name, here,
  // before anything is evaluated or stored.
  try {
    checkDesignInputs(stack, maskWavelengths(mask));
  } catch (err) {
    if (err instanceof RangeError) throw new HttpError(400, "invalid_physics_input", err.message);
    throw err;
  }
  const { protective: _drop, ...storedMask } = mask;
  return { stack, storedMask, evalMask: { ...storedMask, protective: input.program.protective } };
}

/** A design that cannot be evaluated against its mask is the caller's 400. */
export function notComputable(err: unknown): never {
  if (err instanceof RangeError)
    throw new HttpError(
      400,
      "not_computable",
      `The design cannot be evaluated against the spec mask: ${err.message}`,
    );
  throw err;
}

/**
 * Store the next revision of a design (number = last + 1, status draft). The stack is validated and made
 * self-contained (workspace materials embedded); the mask defaults to the program's current mask. The design
 * must be computable against the mask (e.g. tabulated materials must cover the bands), else 400.
 */
export function createRevision(tx: DbOrTx, input: NewRevision): RevisionRow {
  const { stack, storedMask, evalMask } = revisionInput(tx, input);
  if (!input.evaluated) {
    try {
      evaluateSpec(stack, evalMask);
    } catch (err) {
      notComputable(err);
    }
  }
  return storeRevision(tx, {
    design: input.design,
    stack,
    specMask: storedMask,
    note: input.note,
    authorId: input.authorId,
  });
}

/**
 * Stores the next revision of a design as given (number = last + 1, status draft, content hash of the stack and the
 * stored mask), as of `at`. The caller has validated the stack and mask: createRevision does, the demo seeder's
 * designs are the optics package's own.
 */
export function storeRevision(
  tx: DbOrTx,
  input: {
    design: Pick<DesignRow, "id">;
    stack: Design;
    specMask: SpecMask;
    note: string;
    authorId: string;
    at?: Date;
  },
): RevisionRow {
  const last = tx
    .select({ n: max(revisions.number) })
    .from(revisions)
    .where(eq(revisions.designId, input.design.id))
    .get();
  const row = {
    id: newId(),
    designId: input.design.id,
    number: (last?.n ?? 0) + 1,
    stack: input.stack,
    specMask: input.specMask,
    note: input.note,
    authorId: input.authorId,
    hash: revisionHash(input.stack, input.specMask),
    status: "draft" as const,
    statusChangedAt: null,
    createdAt: input.at ?? new Date(),
  };
  tx.insert(revisions).values(row).run();
  return tx.select().from(revisions).where(eq(revisions.id, row.id)).get() as RevisionRow;
}

/** Stores a new design (no revision yet) in a program, as of `at`. */
export function storeDesign(
  tx: DbOrTx,
  input: { programId: string; name: string; createdBy: string; at?: Date },
): DesignRow {
  const design = {
    id: newId(),
    programId: input.programId,
    name: input.name,
    createdBy: input.createdBy,
    createdAt: input.at ?? new Date(),
  };
  tx.insert(designs).values(design).run();
  return design;
}

/**
 * Creates a design in a program with its revision 1 (see createRevision) and the audit entry, in one transaction.
 */
export function createDesign(
  db: DbOrTx,
  input: Omit<NewRevision, "design" | "authorId"> & { actor: Actor; name: string },
): { design: DesignRow; revision: RevisionRow } {
  const { actor, program } = input;
  return db.transaction((tx) => {
    const design = storeDesign(tx, { programId: program.id, name: input.name, createdBy: actor.id });
    const revision = createRevision(tx, {
      workspaceId: input.workspaceId,
      design,
      program,
      stack: input.stack,
      specMask: input.specMask,
      note: input.note,
      authorId: actor.id,
      evaluated: input.evaluated,
    });
    recordAudit(tx, {
      workspaceId: input.workspaceId,
      actorId: actor.id,
      action: "design.created",
      subjectType: "design",
      subjectId: design.id,
      summary: `${actor.name} created the design ${design.name} in ${program.name} (rev 1)`,
      data: { revisionId: revision.id, hash: revision.hash },
    });
    return { design, revision };
  });
}

/**
 * Adds the next revision of a design, saved from `baseRevisionId` (409 stale_base when that is not the design's
 * latest: checked inside the transaction, so two saves from one base cannot both pass), with the audit entry.
 */
export function addRevision(
  db: DbOrTx,
  input: Omit<NewRevision, "authorId"> & { actor: Actor; baseRevisionId: string | null },
): RevisionRow {
  const { actor, design } = input;
  return db.transaction((tx) => {
    assertFreshBase(tx, design.id, input.baseRevisionId);
    const revision = createRevision(tx, {
      workspaceId: input.workspaceId,
      design,
      program: input.program,
      stack: input.stack,
      specMask: input.specMask,
      note: input.note,
      authorId: actor.id,
      evaluated: input.evaluated,
    });
    recordAudit(tx, {
      workspaceId: input.workspaceId,
      actorId: actor.id,
      action: "revision.created",
      subjectType: "revision",
      subjectId: revision.id,
      summary: `${actor.name} added ${design.name} rev ${revision.number}`,
      data: { hash: revision.hash },
    });
    return revision;
  });
}

/**
 * Refuses a save whose base is not the design's latest revision (another save got in first): 409 stale_base naming
 * both revisions. Call inside the transaction that creates the revision, so two saves from one base cannot both pass.
 * `baseRevisionId` null is accepted only while the design has no revision yet.
 */
export function assertFreshBase(tx: DbOrTx, designId: string, baseRevisionId: string | null): void {
  const latest = tx
    .select({ id: revisions.id, number: revisions.number, createdAt: revisions.createdAt })
    .from(revisions)
    .where(eq(revisions.designId, designId))
    .orderBy(desc(revisions.number))
    .limit(1)
    .get();
  if (!latest && baseRevisionId === null) return;
  const base =
    baseRevisionId === null
      ? undefined
      : tx
          .select({ id: revisions.id, number: revisions.number })
          .from(revisions)
          .where(and(eq(revisions.id, baseRevisionId), eq(revisions.designId, designId)))
          .get();
  if (baseRevisionId !== null && !base) {
    throw new HttpError(400, "unknown_base", `Revision ${baseRevisionId} is not a revision of this design.`);
  }
  if (latest && base?.id === latest.id) return;
  if (!latest)
    throw new HttpError(
      400,
      "unknown_base",
      "This design has no revision yet: save with baseRevisionId null.",
    );
  const from = base ? `rev ${base.number}` : "no revision";
  throw new HttpError(
    409,
    "stale_base",
    `This save starts from ${from}, but the design's latest is rev ${latest.number} (saved ${latest.createdAt.toISOString()}). ` +
      `Open rev ${latest.number}, carry your changes over and save again.`,
    {
      baseRevision: base ? { id: base.id, number: base.number } : null,
      latestRevision: { id: latest.id, number: latest.number },
    } satisfies StaleBase,
  );
}

export function programView(p: ProgramRow) {
  return {
    id: p.id,
    name: p.name,
    customer: p.customer,
    description: p.description,
    application: p.application,
    protective: p.protective,
    targetYield: p.targetYield,
    minEvidenceTrials: p.minEvidenceTrials,
    confidence: p.confidence,
    version: p.version,
    specMask: p.specMask,
    errorModel: p.errorModel,
    studyDefaults: p.studyDefaults,
    createdAt: p.createdAt.toISOString(),
  };
}

/** Compact revision for lists and queues. */
export function revisionSummary(db: DbOrTx, rows: readonly RevisionContext[]) {
  const names = userNames(
    db,
    rows.map((r) => r.revision.authorId),
  );
  return rows.map(({ revision: r, design, program }) => {
    const author = person(names, r.authorId) ?? { id: r.authorId, name: "" };
    return {
      id: r.id,
      number: r.number,
      status: r.status,
      note: r.note,
      hash: r.hash,
      author,
      authorName: author.name,
      createdAt: r.createdAt.toISOString(),
      statusChangedAt: r.statusChangedAt ? r.statusChangedAt.toISOString() : null,
      designId: design.id,
      designName: design.name,
      programId: program.id,
      programName: program.name,
    };
  });
}

export type RevisionSummary = ReturnType<typeof revisionSummary>[number];

/** Full revision with its nominal verdict computed by the optics package (`given`: already computed on the pool). */
export function revisionView(db: DbOrTx, rc: RevisionContext, given?: SpecResult) {
  const r = rc.revision;
  const mask = maskOf(r, rc.program);
  const nominal = given ?? evaluateSpec(stackOf(r), mask);
  const names = userNames(db, [r.authorId]);
  return {
    id: r.id,
    designId: rc.design.id,
    designName: rc.design.name,
    programId: rc.program.id,
    programName: rc.program.name,
    number: r.number,
    status: r.status,
    stack: r.stack,
    specMask: mask,
    note: r.note,
    author: person(names, r.authorId),
    hash: r.hash,
    createdAt: r.createdAt.toISOString(),
    statusChangedAt: r.statusChangedAt ? r.statusChangedAt.toISOString() : null,
    nominal: { pass: nominal.pass, bands: nominal.bands, merit: nominal.merit, cautions: nominal.cautions },
    specDeviation: specDeviationSummary(db, rc),
  };
}

/** Whether a revision's mask deviates from its program's, and where its deviation stands (null status: none asked). */
export function specDeviationSummary(db: DbOrTx, rc: RevisionContext) {
  const d = deviationState(db, rc);
  return {
    required: d.required,
    bands: d.bands,
    status: d.current?.status ?? null,
    reason: d.current?.reason ?? null,
  };
}

export function designRevisions(db: DbOrTx, design: DesignRow, program: ProgramRow): RevisionContext[] {
  return db
    .select()
    .from(revisions)
    .where(eq(revisions.designId, design.id))
    .orderBy(desc(revisions.number))
    .all()
    .map((revision) => ({ revision, design, program }));
}

export function designView(db: DbOrTx, design: DesignRow, program: ProgramRow) {
  return {
    id: design.id,
    name: design.name,
    createdAt: design.createdAt.toISOString(),
    program: {
      id: program.id,
      name: program.name,
      targetYield: program.targetYield,
      protective: program.protective,
    },
    revisions: revisionSummary(db, designRevisions(db, design, program)),
  };
}

/** Newest done and verified run of a revision, or null. */
export function latestVerifiedRun(db: DbOrTx, revisionId: string) {
  const run = db
    .select()
    .from(yieldRuns)
    .where(
      and(eq(yieldRuns.revisionId, revisionId), eq(yieldRuns.status, "done"), eq(yieldRuns.verified, true)),
    )
    .orderBy(desc(yieldRuns.finishedAt), desc(yieldRuns.id))
    .get();
  return run ?? null;
}

/** One row of the home table for a design. */
export function overviewRow(db: DbOrTx, design: DesignRow, program: ProgramRow) {
  return overviewRows(db, [{ design, program }])[0];
}

/**
 * Rows of the home table, one per design in the order given, from a fixed number of queries (latest revisions,
 * open threads, verified runs of the latest revisions, author names) whatever the number of designs.
 */
export function overviewRows(db: DbOrTx, rows: readonly { design: DesignRow; program: ProgramRow }[]) {
  if (rows.length === 0) return [];
  const designIds = [...new Set(rows.map((r) => r.design.id))];
  const latestNumbers = db
    .select({ designId: revisions.designId, latestNumber: max(revisions.number).as("latest_number") })
    .from(revisions)
    .where(inArray(revisions.designId, designIds))
    .groupBy(revisions.designId)
    .as("latest_numbers");
  const latestByDesign = new Map<string, RevisionRow>();
  for (const r of db
    .select({ revision: revisions })
    .from(revisions)
    .innerJoin(
      latestNumbers,
      and(eq(latestNumbers.designId, revisions.designId), eq(latestNumbers.latestNumber, revisions.number)),
    )
    .all()) {
    latestByDesign.set(r.revision.designId, r.revision);
  }
  const openByDesign = new Map<string, { open: number; blocking: number }>();
  for (const t of db
    .select({ designId: threads.designId, severity: threads.severity, n: count() })
    .from(threads)
    .where(and(inArray(threads.designId, designIds), eq(threads.status, "open")))
    .groupBy(threads.designId, threads.severity)
    .all()) {
    const c = openByDesign.get(t.designId) ?? { open: 0, blocking: 0 };
    c.open += t.n;
    if (t.severity === "blocking") c.blocking += t.n;
    openByDesign.set(t.designId, c);
  }
  const latestIds = [...latestByDesign.values()].map((r) => r.id);
  // The evidence run of each latest revision under its program's current rules (what the gate reads).
  const evidenceRuns = new Map<string, YieldRunRow[]>();
  if (latestIds.length > 0) {
    for (const r of db
      .select()
      .from(yieldRuns)
      .where(
        and(
          inArray(yieldRuns.revisionId, latestIds),
          eq(yieldRuns.kind, "evidence"),
          eq(yieldRuns.status, "done"),
        ),
      )
      .all()) {
      evidenceRuns.set(r.revisionId, [...(evidenceRuns.get(r.revisionId) ?? []), r]);
    }
  }
  const names = userNames(
    db,
    [...latestByDesign.values()].map((r) => r.authorId),
  );
  return rows.map(({ design, program }) => {
    const latest = latestByDesign.get(design.id);
    const run = latest
      ? pickEvidenceRun(
          evidenceRuns.get(latest.id) ?? [],
          evidencePlan({ revision: latest, design, program }),
        )
      : null;
    const result = (run?.result ?? null) as YieldResult | null;
    const figures = result ? evidenceFigures(result, program) : null;
    const open = openByDesign.get(design.id) ?? { open: 0, blocking: 0 };
    return {
      design: { id: design.id, name: design.name },
      program: {
        id: program.id,
        name: program.name,
        targetYield: program.targetYield,
        protective: program.protective,
        version: program.version,
        minEvidenceTrials: program.minEvidenceTrials,
        confidence: program.confidence,
      },
      latestRevision: latest
        ? {
            id: latest.id,
            number: latest.number,
            status: latest.status,
            authorName: person(names, latest.authorId)?.name ?? "",
            createdAt: latest.createdAt.toISOString(),
          }
        : null,
      /** The evidence run's figures (null until it is done): point yield, 95 % interval, bound at the program's confidence. */
      latestVerifiedYield:
        result && run && figures
          ? {
              yield: result.yield,
              low: result.interval.low,
              high: result.interval.high,
              runId: run.id,
              trials: figures.trials,
              lowerBound: figures.lowerBound,
              confidence: figures.confidence,
              pass: figures.pass,
            }
          : null,
      openBlockingThreads: open.blocking,
      openThreads: open.open,
    };
  });
}

export function programDesigns(db: DbOrTx, program: ProgramRow): DesignRow[] {
  return db
    .select()
    .from(designs)
    .where(eq(designs.programId, program.id))
    .orderBy(desc(designs.createdAt), desc(designs.id))
    .all();
}
