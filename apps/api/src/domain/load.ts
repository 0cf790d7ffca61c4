// Loading domain rows scoped to the signed-in member's workspace: anything outside it is a 404.
import { and, eq, inArray } from "drizzle-orm";
import type { Design, SpecMask } from "@stackproof/optics";
import type { Db } from "../db/client.ts";
import { designs, programs, revisions, threads, users, yieldRuns } from "../db/schema.ts";
import type { DbOrTx } from "../lib/audit.ts";
import { notFound } from "../lib/errors.ts";

export type ProgramRow = typeof programs.$inferSelect;
export type DesignRow = typeof designs.$inferSelect;
export type RevisionRow = typeof revisions.$inferSelect;
export type YieldRunRow = typeof yieldRuns.$inferSelect;
export type ThreadRow = typeof threads.$inferSelect;

export function loadProgram(db: DbOrTx, workspaceId: string, id: string): ProgramRow {
  const row = db
    .select()
    .from(programs)
    .where(and(eq(programs.id, id), eq(programs.workspaceId, workspaceId)))
    .get();
  if (!row) throw notFound("Program");
  return row;
}

export function loadDesign(
  db: DbOrTx,
  workspaceId: string,
  id: string,
): { design: DesignRow; program: ProgramRow } {
  const row = db
    .select({ design: designs, program: programs })
    .from(designs)
    .innerJoin(programs, eq(designs.programId, programs.id))
    .where(and(eq(designs.id, id), eq(programs.workspaceId, workspaceId)))
    .get();
  if (!row) throw notFound("Design");
  return row;
}

export interface RevisionContext {
  revision: RevisionRow;
  design: DesignRow;
  program: ProgramRow;
}

export function loadRevision(db: DbOrTx, workspaceId: string, id: string): RevisionContext {
  const row = db
    .select({ revision: revisions, design: designs, program: programs })
    .from(revisions)
    .innerJoin(designs, eq(revisions.designId, designs.id))
    .innerJoin(programs, eq(designs.programId, programs.id))
    .where(and(eq(revisions.id, id), eq(programs.workspaceId, workspaceId)))
    .get();
  if (!row) throw notFound("Revision");
  return row;
}

export function loadYieldRun(
  db: DbOrTx,
  workspaceId: string,
  id: string,
): RevisionContext & { run: YieldRunRow } {
  const row = db
    .select({ run: yieldRuns, revision: revisions, design: designs, program: programs })
    .from(yieldRuns)
    .innerJoin(revisions, eq(yieldRuns.revisionId, revisions.id))
    .innerJoin(designs, eq(revisions.designId, designs.id))
    .innerJoin(programs, eq(designs.programId, programs.id))
    .where(and(eq(yieldRuns.id, id), eq(programs.workspaceId, workspaceId)))
    .get();
  if (!row) throw notFound("Yield run");
  return row;
}

export function loadThread(
  db: DbOrTx,
  workspaceId: string,
  id: string,
): { thread: ThreadRow; design: DesignRow; program: ProgramRow } {
  const row = db
    .select({ thread: threads, design: designs, program: programs })
    .from(threads)
    .innerJoin(designs, eq(threads.designId, designs.id))
    .innerJoin(programs, eq(designs.programId, programs.id))
    .where(and(eq(threads.id, id), eq(programs.workspaceId, workspaceId)))
    .get();
  if (!row) throw notFound("Thread");
  return row;
}

/** The revision's stack as stored (validated with parseDesign when it was created). */
export function stackOf(revision: RevisionRow): Design {
  return revision.stack;
}

/** The revision's spec mask, with `protective` taken from the program. */
export function maskOf(revision: RevisionRow, program: ProgramRow): SpecMask {
  return { ...revision.specMask, protective: program.protective };
}

/** id → {id, name} for the given user ids (unknown ids are left out). */
export function userNames(
  db: Db | DbOrTx,
  ids: Iterable<string | null | undefined>,
): Map<string, { id: string; name: string }> {
  const wanted = [...new Set([...ids].filter((x): x is string => typeof x === "string"))];
  const out = new Map<string, { id: string; name: string }>();
  if (wanted.length === 0) return out;
  for (const u of db
    .select({ id: users.id, name: users.name })
    .from(users)
    .where(inArray(users.id, wanted))
    .all()) {
    out.set(u.id, u);
  }
  return out;
}

export function person(
  map: Map<string, { id: string; name: string }>,
  id: string | null | undefined,
): { id: string; name: string } | null {
  if (!id) return null;
  return map.get(id) ?? { id, name: "(former member)" };
}
