// Creating revisions (immutable content + content hash) and the JSON views of programs, designs and revisions.
import { and, count, desc, eq, inArray, max } from "drizzle-orm";
import { SpecMaskSchema, evaluateSpec, type SpecMask, type YieldResult } from "@stackproof/optics";
import { designs, revisions, threads, yieldRuns } from "../db/schema.ts";
import type { DbOrTx } from "../lib/audit.ts";
import { HttpError } from "../lib/errors.ts";
import { zodDetails } from "../lib/errors.ts";
import { newId, revisionHash } from "./canonical.ts";
import { resolveDesign } from "./materials.ts";
import {
  maskOf,
  person,
  stackOf,
  userNames,
  type DesignRow,
  type ProgramRow,
  type RevisionContext,
  type RevisionRow,
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
}

/**
 * Store the next revision of a design (number = last + 1, status draft). The stack is validated and made
 * self-contained (workspace materials embedded); the mask defaults to the program's current mask. The design
 * must be computable against the mask (e.g. tabulated materials must cover the bands), else 400.
 */
export function createRevision(tx: DbOrTx, input: NewRevision): RevisionRow {
  const stack = resolveDesign(tx, input.workspaceId, input.stack);
  const mask = parseMask(input.specMask ?? input.program.specMask);
  const { protective: _drop, ...storedMask } = mask;
  try {
    evaluateSpec(stack, { ...storedMask, protective: input.program.protective });
  } catch (err) {
    if (err instanceof RangeError)
      throw new HttpError(
        400,
        "not_computable",
        `The design cannot be evaluated against the spec mask: ${err.message}`,
      );
    throw err;
  }
  const last = tx
    .select({ n: max(revisions.number) })
    .from(revisions)
    .where(eq(revisions.designId, input.design.id))
    .get();
  const row = {
    id: newId(),
    designId: input.design.id,
    number: (last?.n ?? 0) + 1,
    stack,
    specMask: storedMask,
    note: input.note,
    authorId: input.authorId,
    hash: revisionHash(stack, storedMask),
    status: "draft" as const,
    createdAt: new Date(),
  };
  tx.insert(revisions).values(row).run();
  return tx.select().from(revisions).where(eq(revisions.id, row.id)).get() as RevisionRow;
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

/** Full revision with its nominal verdict computed by the optics package. */
export function revisionView(db: DbOrTx, rc: RevisionContext) {
  const r = rc.revision;
  const mask = maskOf(r, rc.program);
  const nominal = evaluateSpec(stackOf(r), mask);
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
  // Newest done, verified run of each latest revision (same order as latestVerifiedRun): ids first, then results.
  const newestRun = new Map<string, string>();
  if (latestIds.length > 0) {
    for (const r of db
      .select({ id: yieldRuns.id, revisionId: yieldRuns.revisionId })
      .from(yieldRuns)
      .where(
        and(
          inArray(yieldRuns.revisionId, latestIds),
          eq(yieldRuns.status, "done"),
          eq(yieldRuns.verified, true),
        ),
      )
      .orderBy(desc(yieldRuns.finishedAt), desc(yieldRuns.id))
      .all()) {
      if (!newestRun.has(r.revisionId)) newestRun.set(r.revisionId, r.id);
    }
  }
  const results = new Map<string, YieldResult>();
  if (newestRun.size > 0) {
    for (const r of db
      .select({ id: yieldRuns.id, result: yieldRuns.result })
      .from(yieldRuns)
      .where(inArray(yieldRuns.id, [...newestRun.values()]))
      .all()) {
      if (r.result) results.set(r.id, r.result);
    }
  }
  const names = userNames(
    db,
    [...latestByDesign.values()].map((r) => r.authorId),
  );
  return rows.map(({ design, program }) => {
    const latest = latestByDesign.get(design.id);
    const runId = latest ? newestRun.get(latest.id) : undefined;
    const result = runId ? results.get(runId) : undefined;
    const open = openByDesign.get(design.id) ?? { open: 0, blocking: 0 };
    return {
      design: { id: design.id, name: design.name },
      program: {
        id: program.id,
        name: program.name,
        targetYield: program.targetYield,
        protective: program.protective,
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
      latestVerifiedYield:
        result && runId
          ? { yield: result.yield, low: result.interval.low, high: result.interval.high, runId }
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
