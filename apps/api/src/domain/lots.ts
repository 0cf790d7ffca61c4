// Measured lots: parts measured after a coating run, their verdicts against the revision's mask, as-built
// fits, the lot's actual yield next to the predicted one, and calibration of the program's error model.
// Every write happens here, in one transaction with its audit row; verdicts and fits are computed before
// the transaction so a refused input stores nothing.
import { and, desc, eq, inArray } from "drizzle-orm";
import {
  lotYield,
  MaterialSchema,
  partVerdict,
  type BuiltFitResult,
  type CalibrationPart,
  type Design,
  type ErrorModel,
  type FilmFitResult,
  type MeasuredPart,
  type MeasuredSpectrum,
  type PartVerdict,
  type SpecMask,
} from "@stackproof/optics";
import type { Db } from "../db/client.ts";
import { materials, measuredLots, measuredParts, releases, revisions, yieldRuns } from "../db/schema.ts";
import { recordAudit, type DbOrTx } from "../lib/audit.ts";
import { HttpError, conflict } from "../lib/errors.ts";
import { newId } from "./canonical.ts";
import { isBuiltIn } from "./materials.ts";
import { maskOf, stackOf, type RevisionContext } from "./load.ts";
import { calibrateOffThread, type CalibrationRequest } from "../asbuilt/index.ts";
import type { Actor } from "./deps.ts";

export type LotRow = typeof measuredLots.$inferSelect;
export type PartRow = typeof measuredParts.$inferSelect;

/** Run a pure optics call; its RangeError becomes a 400 naming the value. */
function physics<T>(fn: () => T): T {
  try {
    return fn();
  } catch (err) {
    if (err instanceof RangeError) throw new HttpError(400, "invalid_input", err.message);
    throw err;
  }
}

function verdicts(mask: SpecMask, parts: MeasuredPart[], guardK: number): PartVerdict[] {
  return physics(() => parts.map((p) => partVerdict(mask, p, guardK)));
}

export interface LotMeta {
  runId: string;
  runDate: string;
  chamber: string;
  notes: string;
  guardK: number;
}

/** Create a lot with its parts; 409 when a part label repeats. Returns the lot id. */
export function createLot(
  db: Db,
  workspaceId: string,
  actor: Actor,
  rc: RevisionContext,
  meta: LotMeta,
  parts: MeasuredPart[],
): string {
  const labels = new Set<string>();
  for (const p of parts) {
    if (labels.has(p.id)) throw conflict(`The part "${p.id}" appears twice in the upload.`);
    labels.add(p.id);
  }
  const mask = maskOf(rc.revision, rc.program);
  const vs = verdicts(mask, parts, meta.guardK);
  const id = newId();
  db.transaction((tx) => {
    tx.insert(measuredLots)
      .values({
        id,
        workspaceId,
        programId: rc.program.id,
        revisionId: rc.revision.id,
        runId: meta.runId,
        runDate: meta.runDate,
        chamber: meta.chamber,
        notes: meta.notes,
        guardK: meta.guardK,
        createdBy: actor.id,
        createdAt: new Date(),
      })
      .run();
    parts.forEach((p, i) => {
      tx.insert(measuredParts)
        .values({
          id: newId(),
          lotId: id,
          label: p.id,
          measurements: p.measurements,
          status: vs[i]!.status,
          verdict: vs[i],
          createdAt: new Date(),
        })
        .run();
    });
    const passed = vs.filter((v) => v.status === "pass").length;
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "lot.created",
      subjectType: "lot",
      subjectId: id,
      summary: `${actor.name} uploaded run ${meta.runId} (${parts.length} parts, ${passed} passed) for ${rc.design.name} rev ${rc.revision.number}`,
      data: { revisionId: rc.revision.id, runId: meta.runId, parts: parts.length, passed },
    });
  });
  return id;
}

/**
 * Add spectra to a lot (another file: R after T, another angle, more parts). Columns named like an existing
 * part add a measurement to it; new names add parts. Verdicts of the touched parts are recomputed.
 */
export function addSpectra(
  db: Db,
  workspaceId: string,
  actor: Actor,
  rc: RevisionContext,
  lot: LotRow,
  incoming: MeasuredPart[],
): void {
  const existing = db.select().from(measuredParts).where(eq(measuredParts.lotId, lot.id)).all();
  const byLabel = new Map(existing.map((p) => [p.label, p]));
  const seen = new Set<string>();
  const merged: MeasuredPart[] = incoming.map((p) => {
    if (seen.has(p.id)) throw conflict(`The part "${p.id}" appears twice in the upload.`);
    seen.add(p.id);
    const old = byLabel.get(p.id);
    return {
      id: p.id,
      measurements: [...((old?.measurements as MeasuredSpectrum[] | undefined) ?? []), ...p.measurements],
    };
  });
  const vs = verdicts(maskOf(rc.revision, rc.program), merged, lot.guardK);
  db.transaction((tx) => {
    merged.forEach((p, i) => {
      const old = byLabel.get(p.id);
      if (old)
        tx.update(measuredParts)
          .set({
            measurements: p.measurements,
            status: vs[i]!.status,
            verdict: vs[i],
            fit: null,
            fittedAt: null,
          })
          .where(eq(measuredParts.id, old.id))
          .run();
      else
        tx.insert(measuredParts)
          .values({
            id: newId(),
            lotId: lot.id,
            label: p.id,
            measurements: p.measurements,
            status: vs[i]!.status,
            verdict: vs[i],
            createdAt: new Date(),
          })
          .run();
    });
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "lot.spectra_added",
      subjectType: "lot",
      subjectId: lot.id,
      summary: `${actor.name} added spectra of ${merged.length} parts to run ${lot.runId}`,
      data: { parts: merged.map((p) => p.id) },
    });
  });
}

/** Store an as-built fit of a part (the fitted spectra are kept: the page draws them). */
export function storePartFit(
  db: Db,
  workspaceId: string,
  actor: Actor,
  lot: LotRow,
  part: PartRow,
  fit: BuiltFitResult,
): void {
  const { design: _design, ...stored } = fit;
  db.transaction((tx) => {
    tx.update(measuredParts)
      .set({ fit: stored, fittedAt: new Date() })
      .where(eq(measuredParts.id, part.id))
      .run();
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "part.fitted",
      subjectType: "part",
      subjectId: part.id,
      summary: `${actor.name} fitted part ${part.label} of run ${lot.runId} (${fit.models[fit.chosen]!.kind} model)`,
    });
  });
}

/** The predicted yield of a revision: its release record's run, else its latest finished server run. */
export function predictedYield(
  db: DbOrTx,
  revisionId: string,
): { yield: number; low: number; high: number; yieldRunId: string } | null {
  const rel = db
    .select({ runId: releases.yieldRunId })
    .from(releases)
    .where(eq(releases.revisionId, revisionId))
    .get();
  const run = rel
    ? db.select().from(yieldRuns).where(eq(yieldRuns.id, rel.runId)).get()
    : db
        .select()
        .from(yieldRuns)
        .where(and(eq(yieldRuns.revisionId, revisionId), eq(yieldRuns.status, "done")))
        .orderBy(desc(yieldRuns.createdAt))
        .get();
  const r = run?.result as { yield?: number; interval?: { low: number; high: number } } | null | undefined;
  if (!run || !r || typeof r.yield !== "number" || !r.interval) return null;
  return { yield: r.yield, low: r.interval.low, high: r.interval.high, yieldRunId: run.id };
}

/** A lot's summary: actual yield with its Wilson interval next to the predicted yield. */
export function lotSummary(db: DbOrTx, lot: LotRow, parts: PartRow[], mask: SpecMask) {
  const predicted = predictedYield(db, lot.revisionId);
  const y = lotYield(
    parts.map((p) => p.verdict as PartVerdict),
    predicted ? { yield: predicted.yield, low: predicted.low, high: predicted.high } : undefined,
    mask,
  );
  return { ...y, predictedRunId: predicted?.yieldRunId ?? null };
}

/**
 * Fitted parts of a program's lots, reduced to calibration input: each part's determinable layers with their
 * deposition index and nominal thickness, keyed by the revision it was built to.
 */
export function calibrationInput(db: DbOrTx, programId: string): CalibrationPart[] {
  const lots = db.select().from(measuredLots).where(eq(measuredLots.programId, programId)).all();
  if (lots.length === 0) return [];
  const parts = db
    .select()
    .from(measuredParts)
    .where(
      inArray(
        measuredParts.lotId,
        lots.map((l) => l.id),
      ),
    )
    .all()
    .filter((p) => p.fit);
  const lotOf = new Map(lots.map((l) => [l.id, l]));
  return parts.map((p) => {
    const fit = p.fit as Omit<BuiltFitResult, "design">;
    const lot = lotOf.get(p.lotId)!;
    const chosen = fit.models[fit.chosen]!;
    const index: Record<string, { valuePct: number; sePct: number }> = {};
    for (const q of chosen.parameters)
      if (q.kind === "index" && q.determinable && q.material)
        index[q.material] = { valuePct: q.value * 100, sePct: q.se * 100 };
    return {
      runId: lot.runId,
      date: lot.runDate,
      designKey: lot.revisionId,
      layers: fit.layers
        .filter((l) => l.determinable && l.errorPct !== null && l.sePct !== null)
        .map((l) => ({
          material: l.material,
          errorPct: l.errorPct!,
          sePct: l.sePct!,
          index: l.index,
          nominalNm: l.nominalNm,
        })),
      ...(Object.keys(index).length > 0 ? { index } : {}),
    };
  });
}

/** What the calibration worker needs: the fitted parts, the program's error model and the designs they were built to. */
export function calibrationRequest(
  db: DbOrTx,
  programId: string,
  errorModel: ErrorModel,
): CalibrationRequest | null {
  const parts = calibrationInput(db, programId);
  if (parts.length === 0) return null;
  const ids = [...new Set(parts.map((p) => p.designKey!))];
  const designs: Record<string, Design> = {};
  for (const r of db.select().from(revisions).where(inArray(revisions.id, ids)).all())
    designs[r.id] = stackOf(r);
  return { kind: "calibration", parts, errorModel, designs };
}

/**
 * Calibrate the program's error model from its fitted parts (null when there are none), off the request thread:
 * the independent-error model (calibrateErrorModel) and, when the program's error model has a process model,
 * that model's parameters (calibrateProcessModel) in `process`.
 */
export async function programCalibration(db: DbOrTx, programId: string, errorModel: ErrorModel) {
  const req = calibrationRequest(db, programId, errorModel);
  return req ? calibrateOffThread(req) : null;
}

/** Store a fitted witness film as a workspace material; 409 when the id is taken. */
export function storeFilmMaterial(
  db: Db,
  workspaceId: string,
  actor: Actor,
  id: string,
  name: string,
  fit: FilmFitResult,
  fileName: string,
): string {
  if (isBuiltIn(id)) throw conflict(`"${id}" is a built-in material id; choose another id.`);
  const m = fit.model;
  const source =
    `fitted to ${fileName}: d = ${fit.thicknessNm.toFixed(1)} ± ${fit.thicknessSeNm.toFixed(1)} nm, ` +
    `Cauchy A = ${m.A.toFixed(4)}, B = ${m.B.toFixed(5)} µm², Urbach k0 = ${m.k0.toExponential(2)} at ${m.E0.toFixed(3)} eV, ` +
    `Eu = ${m.Eu.toFixed(3)} eV; residual RMS ${fit.residualRmsPct.toFixed(3)} pp, χ²/dof ${fit.residualVariance.toFixed(2)}`;
  const material = MaterialSchema.parse({ ...fit.material, id, name, source });
  const rowId = newId();
  db.transaction((tx) => {
    const taken = tx
      .select({ id: materials.id })
      .from(materials)
      .where(and(eq(materials.workspaceId, workspaceId), eq(materials.materialId, id)))
      .get();
    if (taken)
      throw conflict(
        `The workspace already has a material "${id}"; materials are not replaced, choose another id.`,
      );
    tx.insert(materials)
      .values({
        id: rowId,
        workspaceId,
        materialId: id,
        name,
        role: "layer",
        source,
        model: material.model,
        createdBy: actor.id,
      })
      .run();
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "material.created",
      subjectType: "material",
      subjectId: rowId,
      summary: `${actor.name} stored the witness-film material ${id} (${name}) fitted from ${fileName}`,
    });
  });
  return rowId;
}
