// Materials (built-in library + uploaded n,k tables) and measured spectra of revisions.
import type { Router } from "express";
import { and, asc, desc, eq } from "drizzle-orm";
import { MATERIAL_LIBRARY, MaterialSchema } from "@stackproof/optics";
import type { AppContext } from "../../context.ts";
import { getAuth } from "../../auth/guards.ts";
import { materials, measurements } from "../../db/schema.ts";
import { keysetWhere, pageQuery, toPage } from "../../lib/pagination.ts";
import { route } from "../../lib/route.ts";
import { loadRevision } from "../../domain/load.ts";
import { assertNotBuiltIn, createMaterial } from "../../domain/materials.ts";
import { addMeasurement, measurementView } from "../../domain/measurements.ts";
import { parseIndexTable, parseSingleSpectrum } from "../../uploads/csv.ts";
import { singleFile, uploadedText } from "../../uploads/index.ts";
import {
  IdParams,
  MaterialListResponse,
  MaterialOutSchema,
  MeasurementListResponse,
  MeasurementOutSchema,
  fileField,
  MaterialUploadFields,
  MeasurementUploadFields,
} from "@stackproof/contracts";

const TAG = "Materials and measurements";

export function materialRoutes(ctx: AppContext, router: Router): void {
  route(
    router,
    {
      method: "get",
      path: "/materials",
      summary: "Built-in library and workspace materials",
      tag: TAG,
      access: "member",
      response: MaterialListResponse,
    },
    ({ req }) => {
      const auth = getAuth(req);
      const own = ctx.db
        .select()
        .from(materials)
        .where(eq(materials.workspaceId, auth.workspaceId))
        .orderBy(asc(materials.materialId))
        .all();
      return {
        items: [
          ...MATERIAL_LIBRARY.map((m) => ({
            id: m.id,
            name: m.name,
            role: m.role,
            source: m.source,
            builtIn: true,
            model: m.model,
            createdAt: null,
          })),
          ...own.map((m) => ({
            id: m.materialId,
            name: m.name,
            role: m.role,
            source: m.source,
            builtIn: false,
            model: m.model,
            createdAt: m.createdAt.toISOString(),
          })),
        ],
      };
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/materials",
      summary: "Upload a workspace material as an n,k table (CSV wavelength_nm|wavelength_um, n[, k])",
      tag: TAG,
      access: ["designer", "admin"],
      multipart: true,
      before: [singleFile],
      body: MaterialUploadFields.extend({
        file: fileField("CSV n,k table: wavelength_nm or wavelength_um, n[, k] (at most 1 MB)"),
      }),
      status: 201,
      response: MaterialOutSchema,
      errors: {
        409: "The id is taken (built-in or workspace material)",
        413: "File over 1 MB",
        415: "Binary (non-text) file",
        422: "Bad CSV (details: row, column, message)",
      },
    },
    ({ req, body }) => {
      const auth = getAuth(req);
      // Refused before the file is read: a built-in id answers 409 whatever the file holds.
      assertNotBuiltIn(body.id);
      const file = uploadedText(req);
      const points = parseIndexTable(file.text);
      const material = MaterialSchema.parse({
        id: body.id,
        name: body.name,
        role: body.role,
        source:
          body.source ||
          `uploaded n,k table ${file.name} (${points.length} points, ${points[0]?.[0]}–${points[points.length - 1]?.[0]} nm)`,
        model: { kind: "table", points },
      });
      return createMaterial(ctx.db, { workspaceId: auth.workspaceId, actor: auth.user, material });
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/revisions/:id/measurements",
      summary:
        "Attach a measured spectrum: a wavelength column and one R or T column (, ; or tab separated, decimal comma, percent or fraction)",
      tag: TAG,
      access: ["designer"],
      params: IdParams,
      multipart: true,
      before: [singleFile],
      body: MeasurementUploadFields.extend({
        file: fileField("Spectrophotometer CSV: a wavelength column and one R or T column (at most 1 MB)"),
      }),
      status: 201,
      response: MeasurementOutSchema,
      errors: {
        404: "No such revision",
        400: "Scale or quantity needed for this file (the message names it)",
        413: "File over 1 MB",
        415: "Binary (non-text) file",
        422: "Bad CSV (details: row, column, message)",
      },
    },
    ({ req, params, body }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const file = uploadedText(req);
      const spectrum = parseSingleSpectrum(file.text, { scale: body.scale, quantity: body.quantity });
      const row = addMeasurement(ctx.db, {
        workspaceId: auth.workspaceId,
        actor: auth.user,
        rc,
        measurement: {
          label: body.label || file.name,
          quantity: spectrum.quantity,
          angleDeg: body.angleDeg,
          polarization: body.polarization,
          wavelengths: spectrum.wavelengths,
          values: spectrum.values,
        },
      });
      return measurementView(row);
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/revisions/:id/measurements",
      summary: "Measured spectra of a revision, with their data points",
      tag: TAG,
      access: "member",
      params: IdParams,
      query: pageQuery,
      response: MeasurementListResponse,
      errors: { 404: "No such revision" },
    },
    ({ req, params, query }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      const rows = ctx.db
        .select()
        .from(measurements)
        .where(
          and(
            eq(measurements.revisionId, rc.revision.id),
            keysetWhere([measurements.createdAt, measurements.id], query.cursor, "desc"),
          ),
        )
        .orderBy(desc(measurements.createdAt), desc(measurements.id))
        .limit(query.limit + 1)
        .all();
      return toPage(rows, query.limit, (r) => [r.createdAt, r.id], measurementView);
    },
  );
}
