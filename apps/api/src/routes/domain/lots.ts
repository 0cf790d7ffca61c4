// Measured lots of built parts, their verdicts, as-built fits, actual vs predicted yield, calibration of the
// program's error model, and witness-film materials.
import type { Router } from "express";
import { asc, desc, eq, and } from "drizzle-orm";
import { z } from "zod";
import { parseErrorModel, type MeasuredPart, type MeasuredSpectrum } from "@stackproof/optics";
import { fitFilmOffThread, fitPartOffThread } from "../../asbuilt/index.ts";
import type { AppContext } from "../../context.ts";
import { getAuth } from "../../auth/guards.ts";
import { materials, measuredLots, measuredParts } from "../../db/schema.ts";
import { isBuiltIn } from "../../domain/materials.ts";
import { HttpError, conflict, notFound } from "../../lib/errors.ts";
import { route } from "../../lib/route.ts";
import { loadProgram, loadRevision, maskOf, stackOf } from "../../domain/load.ts";
import {
  addSpectra,
  createLot,
  lotSummary,
  programCalibration,
  storeFilmMaterial,
  storePartFit,
  type LotRow,
  type PartRow,
} from "../../domain/lots.ts";
import { parseSpectraTable, type SpectraTable } from "../../uploads/csv.ts";
import { singleFile, uploadedText } from "../../uploads/index.ts";
import {
  CalibrationResponse,
  IdParams,
  LotListResponse,
  LotPartSchema,
  LotSchema,
  PartFitBody,
  SpectraPreviewSchema,
  WitnessFitResponse,
  fileField,
  LotSpectraFields,
  LotUploadFields,
  WitnessFitFields,
} from "@stackproof/contracts";

const TAG = "Measured lots";

const SPECTRA_FILE = "Spectrophotometer CSV: a wavelength column and one column per part (at most 1 MB)";
const LotBody = LotUploadFields.extend({ file: fileField(SPECTRA_FILE) });

/** The required fields the schema leaves optional (so that scoping answers first). */
function required<T>(value: T | undefined, name: string, expected: string): T {
  if (value === undefined)
    throw new HttpError(
      400,
      "validation_failed",
      `body.${name}: required field is missing (expected ${expected})`,
      [{ path: name, message: `required: ${expected}` }],
    );
  return value;
}

function partsFrom(
  table: SpectraTable,
  body: z.output<typeof LotSpectraFields>,
  fileName: string,
): MeasuredPart[] {
  const quantity = required(body.quantity, "quantity", '"R" or "T"');
  return table.columns.map((c) => ({
    id: c.name,
    measurements: [
      {
        wavelengths: table.wavelengths,
        values: c.values,
        quantity,
        angleDeg: body.angleDeg,
        polarization: body.polarization,
        uncertaintyPct: body.uncertaintyPct,
        label: fileName,
      } satisfies MeasuredSpectrum,
    ],
  }));
}

function partView(p: PartRow) {
  return {
    id: p.id,
    label: p.label,
    status: p.status,
    verdict: p.verdict,
    measurements: p.measurements,
    fit: p.fit ?? null,
    fittedAt: p.fittedAt ? p.fittedAt.toISOString() : null,
  };
}

export function lotRoutes(ctx: AppContext, router: Router): void {
  const loadLot = (workspaceId: string, id: string): LotRow => {
    const lot = ctx.db
      .select()
      .from(measuredLots)
      .where(and(eq(measuredLots.id, id), eq(measuredLots.workspaceId, workspaceId)))
      .get();
    if (!lot) throw notFound("Lot");
    return lot;
  };
  const lotView = (lot: LotRow, withParts: boolean) => {
    const parts = ctx.db
      .select()
      .from(measuredParts)
      .where(eq(measuredParts.lotId, lot.id))
      .orderBy(asc(measuredParts.label))
      .all();
    const rc = loadRevision(ctx.db, lot.workspaceId, lot.revisionId);
    return {
      id: lot.id,
      programId: lot.programId,
      revisionId: lot.revisionId,
      runId: lot.runId,
      runDate: lot.runDate,
      chamber: lot.chamber,
      notes: lot.notes,
      guardK: lot.guardK,
      createdAt: lot.createdAt.toISOString(),
      summary: lotSummary(ctx.db, lot, parts, maskOf(rc.revision, rc.program)),
      ...(withParts ? { parts: parts.map(partView) } : {}),
    };
  };

  route(
    router,
    {
      method: "post",
      path: "/lots/preview",
      summary:
        "Read a spectrophotometer file without storing it: separator, decimal comma, detected percent/fraction, columns",
      tag: TAG,
      access: ["designer", "admin"],
      multipart: true,
      before: [singleFile],
      body: z.object({ file: fileField("Spectrophotometer CSV (at most 1 MB)") }),
      response: SpectraPreviewSchema,
      errors: {
        413: "File over 1 MB",
        415: "Binary (non-text) file",
        422: "Bad file (details: row, column, message)",
      },
    },
    ({ req }) => {
      const file = uploadedText(req);
      const t = parseSpectraTable(file.text, "auto");
      return {
        fileName: file.name,
        delimiter: t.delimiter === "\t" ? "tab" : t.delimiter,
        decimalComma: t.decimalComma,
        detectedScale: t.detectedScale,
        reversed: t.reversed,
        rows: t.wavelengths.length,
        wavelengthRange: [t.wavelengths[0], t.wavelengths[t.wavelengths.length - 1]],
        columns: t.columns.map((c) => c.name),
      };
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/revisions/:id/lots",
      summary:
        "Upload a lot of measured parts of a coating run (one CSV, one column per part); verdicts against the revision's mask",
      tag: TAG,
      access: ["designer", "admin"],
      params: IdParams,
      multipart: true,
      before: [singleFile],
      body: LotBody,
      status: 201,
      response: LotSchema,
      errors: {
        400: "Bad field or spectrum (the message names it)",
        404: "No such revision",
        409: "A part appears twice",
        413: "File over 1 MB",
        415: "Binary (non-text) file",
        422: "Bad file (details: row, column, message)",
      },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const scale = required(body.scale, "scale", '"percent" or "fraction"');
      required(body.quantity, "quantity", '"R" or "T"');
      const runId = required(body.runId, "runId", "the chamber's run id");
      const runDate = required(body.runDate, "runDate", "a date YYYY-MM-DD");
      const file = uploadedText(req);
      const table = parseSpectraTable(file.text, scale);
      const id = createLot(
        ctx.db,
        auth.workspaceId,
        auth.user,
        rc,
        { runId, runDate, chamber: body.chamber, notes: body.notes, guardK: body.guardK },
        partsFrom(table, body, file.name),
      );
      return lotView(loadLot(auth.workspaceId, id), true);
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/lots/:id/spectra",
      summary: "Add another file of spectra to a lot (R after T, another angle or polarization, more parts)",
      tag: TAG,
      access: ["designer", "admin"],
      params: IdParams,
      multipart: true,
      before: [singleFile],
      body: LotSpectraFields.extend({ file: fileField(SPECTRA_FILE) }),
      response: LotSchema,
      errors: {
        400: "Bad field or spectrum",
        404: "No such lot",
        409: "A part appears twice",
        422: "Bad file",
      },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const lot = loadLot(auth.workspaceId, params.id);
      const rc = loadRevision(ctx.db, auth.workspaceId, lot.revisionId);
      const scale = required(body.scale, "scale", '"percent" or "fraction"');
      required(body.quantity, "quantity", '"R" or "T"');
      const file = uploadedText(req);
      const table = parseSpectraTable(file.text, scale);
      addSpectra(ctx.db, auth.workspaceId, auth.user, rc, lot, partsFrom(table, body, file.name));
      return lotView(loadLot(auth.workspaceId, lot.id), true);
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/programs/:id/lots",
      summary: "Lots of a program, newest run first, each with actual and predicted yield",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: LotListResponse,
      errors: { 404: "No such program" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      const program = loadProgram(ctx.db, auth.workspaceId, params.id);
      const lots = ctx.db
        .select()
        .from(measuredLots)
        .where(eq(measuredLots.programId, program.id))
        .orderBy(desc(measuredLots.runDate), desc(measuredLots.createdAt))
        .all();
      return { items: lots.map((l) => lotView(l, false)) };
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/lots/:id",
      summary: "A lot with its parts, spectra, verdicts and fits",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: LotSchema,
      errors: { 404: "No such lot" },
    },
    ({ req, params }) => lotView(loadLot(getAuth(req).workspaceId, params.id), true),
  );

  route(
    router,
    {
      method: "post",
      path: "/parts/:id/fit",
      summary:
        "As-built fit of a measured part (nested tooling / index / per-layer models, the program's error model as prior)",
      tag: TAG,
      access: ["designer", "admin"],
      params: IdParams,
      body: PartFitBody,
      response: LotPartSchema,
      errors: { 400: "Bad input (the message names it)", 404: "No such part" },
    },
    async ({ req, params, body }) => {
      const auth = getAuth(req);
      const part = ctx.db.select().from(measuredParts).where(eq(measuredParts.id, params.id)).get();
      if (!part) throw notFound("Part");
      const lot = loadLot(auth.workspaceId, part.lotId);
      const rc = loadRevision(ctx.db, auth.workspaceId, lot.revisionId);
      let errorModel;
      try {
        errorModel = parseErrorModel(rc.program.errorModel);
      } catch (err) {
        if (err instanceof RangeError) throw new HttpError(400, "invalid_input", err.message);
        throw err;
      }
      const fit = await fitPartOffThread(stackOf(rc.revision), part.measurements as MeasuredSpectrum[], {
        errorModel,
        fitIndexScale: body.fitIndexScale,
        baseline: body.baseline,
      });
      storePartFit(ctx.db, auth.workspaceId, auth.user, lot, part, fit);
      return partView(ctx.db.select().from(measuredParts).where(eq(measuredParts.id, part.id)).get()!);
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/programs/:id/calibration",
      summary:
        "Error model (and the program's process model) estimated from the program's fitted parts, with intervals, as proposed new error models; yield history",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: CalibrationResponse,
      errors: { 404: "No such program" },
    },
    async ({ req, params }) => {
      const auth = getAuth(req);
      const program = loadProgram(ctx.db, auth.workspaceId, params.id);
      const current = parseErrorModel(program.errorModel);
      const lots = ctx.db
        .select()
        .from(measuredLots)
        .where(eq(measuredLots.programId, program.id))
        .orderBy(asc(measuredLots.runDate))
        .all();
      const history = lots.map((l) => {
        const v = lotView(l, false);
        return {
          lotId: l.id,
          runId: l.runId,
          runDate: l.runDate,
          revisionId: l.revisionId,
          summary: v.summary,
        };
      });
      return {
        current,
        calibration: await programCalibration(ctx.db, program.id, current),
        history,
        adoptWith: `PATCH /api/v1/programs/${program.id} with { "errorModel": calibration.proposed } (independent errors) or { "errorModel": calibration.process.proposed } (the program's process model, calibrated) (approver or admin); yield evidence must then be re-run`,
      };
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/materials/witness-fit",
      summary:
        "Fit thickness and Cauchy + Urbach n, k of a witness film to its T (and R) and store it as a workspace material",
      tag: TAG,
      access: ["designer", "admin"],
      multipart: true,
      before: [singleFile],
      body: WitnessFitFields.extend({
        file: fileField("CSV: a wavelength column, a T column and optionally an R column (at most 1 MB)"),
      }),
      status: 201,
      response: WitnessFitResponse,
      errors: { 400: "Bad field (the message names it)", 409: "The id is taken", 422: "Bad file" },
    },
    async ({ req, body }) => {
      const auth = getAuth(req);
      const file = uploadedText(req);
      const table = parseSpectraTable(file.text, body.scale, "witness film");
      const col = (q: string) => table.columns.find((c) => c.name.trim().toUpperCase() === q);
      const T = col("T");
      const R = col("R");
      const extra = table.columns.filter((c) => c !== T && c !== R);
      if (!T || extra.length > 0)
        throw new HttpError(
          422,
          "invalid_csv",
          `The witness film file needs a "T" column and optionally an "R" column (got ${table.columns.map((c) => `"${c.name}"`).join(", ")}).`,
        );
      const ms: MeasuredSpectrum[] = [T, ...(R ? [R] : [])].map((c) => ({
        wavelengths: table.wavelengths,
        values: c.values,
        quantity: c === T ? "T" : "R",
        angleDeg: 0,
        polarization: "u",
        uncertaintyPct: body.uncertaintyPct,
      }));
      // a taken id is refused before the fit runs (and again, atomically, when storing)
      if (
        isBuiltIn(body.id) ||
        ctx.db
          .select({ id: materials.id })
          .from(materials)
          .where(and(eq(materials.workspaceId, auth.workspaceId), eq(materials.materialId, body.id)))
          .get()
      )
        throw conflict(
          `The material id "${body.id}" is taken; materials are not replaced, choose another id.`,
        );
      const fit = await fitFilmOffThread(ms, {
        substrate: body.substrate,
        substrateThicknessMm: body.substrateThicknessMm,
        backside: body.backside === "true",
        thicknessRangeNm: [body.minThicknessNm, body.maxThicknessNm],
        materialId: body.id,
        materialName: body.name,
      });
      storeFilmMaterial(ctx.db, auth.workspaceId, auth.user, body.id, body.name, fit, file.name);
      return { materialId: body.id, fit: { ...fit, fitted: undefined } };
    },
  );
}
