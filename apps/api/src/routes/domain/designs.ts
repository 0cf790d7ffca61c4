// Designs, revisions, diffs, design import, the home overview and the per-role queue.
import type { Router } from "express";
import { eq } from "drizzle-orm";
import { DESIGN_FORMAT, MATERIAL_LIBRARY } from "@stackproof/optics";
import type { AppContext } from "../../context.ts";
import { getAuth } from "../../auth/guards.ts";
import { designs, programs } from "../../db/schema.ts";
import { HttpError } from "../../lib/errors.ts";
import { assertWithinLimits, designLimitProblems } from "../../lib/limits.ts";
import { route } from "../../lib/route.ts";
import { diffStacks } from "../../domain/diff.ts";
import { loadDesign, loadRevision, stackOf } from "../../domain/load.ts";
import { resolveDesign, workspaceMaterials } from "../../domain/materials.ts";
import {
  addRevision,
  assertFreshBase,
  designView,
  notComputable,
  overviewRows,
  revisionInput,
  revisionView,
  specDeviationSummary,
} from "../../domain/revisions.ts";
import { nominalFor } from "../../yield/nominal.ts";
import { workQueue } from "../../domain/queue.ts";
import { parseLayerCsv } from "../../uploads/csv.ts";
import { singleFile, uploadedText } from "../../uploads/index.ts";
import {
  DesignSchemaOut,
  DiffQuery,
  IdParams,
  ImportDesignResponse,
  NewRevisionBody,
  OverviewResponse,
  QueueResponse,
  RevisionDiffSchema,
  RevisionSchema,
  fileField,
  DesignImportFields,
} from "@stackproof/contracts";

const TAG = "Designs and revisions";

export function designRoutes(ctx: AppContext, router: Router): void {
  route(
    router,
    {
      method: "get",
      path: "/overview",
      summary: "One row per design for the home table",
      tag: TAG,
      access: "member",
      response: OverviewResponse,
    },
    ({ req }) => {
      const auth = getAuth(req);
      const rows = ctx.db
        .select({ design: designs, program: programs })
        .from(designs)
        .innerJoin(programs, eq(designs.programId, programs.id))
        .where(eq(programs.workspaceId, auth.workspaceId))
        .orderBy(programs.name, designs.name)
        .all();
      return { items: overviewRows(ctx.db, rows) };
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/queue",
      summary: "Revisions waiting for the signed-in member, by role",
      tag: TAG,
      access: "member",
      response: QueueResponse,
    },
    ({ req }) => workQueue(ctx.db, getAuth(req)),
  );

  route(
    router,
    {
      method: "get",
      path: "/designs/:id",
      summary: "A design with its revisions (newest first)",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: DesignSchemaOut,
      errors: { 404: "No such design in this workspace" },
    },
    ({ req, params }) => {
      const auth = getAuth(req);
      const { design, program } = loadDesign(ctx.db, auth.workspaceId, params.id);
      return designView(ctx.db, design, program);
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/designs/:id/revisions",
      summary: "Add a revision (number = last + 1, status draft) from the named base revision",
      tag: TAG,
      access: ["designer"],
      params: IdParams,
      body: NewRevisionBody,
      status: 201,
      response: RevisionSchema,
      errors: {
        404: "No such design in this workspace",
        409: "The base revision is not the design's latest (stale_base); details name both revisions",
      },
    },
    async ({ req, params, body }) => {
      const auth = getAuth(req);
      const { design, program } = loadDesign(ctx.db, auth.workspaceId, params.id);
      // A stale save is refused before any computing; checked again in the transaction below (a save may land meanwhile).
      assertFreshBase(ctx.db, design.id, body.baseRevisionId);
      // Evaluated on the worker pool first: a heavy design never holds the request thread.
      const input = revisionInput(ctx.db, {
        workspaceId: auth.workspaceId,
        program,
        stack: body.stack,
        specMask: body.specMask,
      });
      const nominal = await ctx.compute.evaluateSpec(input.stack, input.evalMask).catch(notComputable);
      const revision = addRevision(ctx.db, {
        workspaceId: auth.workspaceId,
        actor: auth.user,
        design,
        program,
        baseRevisionId: body.baseRevisionId,
        stack: body.stack,
        specMask: body.specMask,
        note: body.note,
        evaluated: true,
      });
      return revisionView(ctx.db, { revision, design, program }, nominal);
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/revisions/:id",
      summary: "A revision with its nominal verdict against the spec mask",
      tag: TAG,
      access: "member",
      params: IdParams,
      response: RevisionSchema,
      errors: { 404: "No such revision in this workspace" },
    },
    async ({ req, params }) => {
      const auth = getAuth(req);
      const rc = loadRevision(ctx.db, auth.workspaceId, params.id);
      return revisionView(ctx.db, rc, await nominalFor(ctx, rc));
    },
  );

  route(
    router,
    {
      method: "get",
      path: "/revisions/:id/diff",
      summary:
        "Layer differences from revision `against` (before) to this one (after), aligned by layer index",
      tag: TAG,
      access: "member",
      params: IdParams,
      query: DiffQuery,
      response: RevisionDiffSchema,
      errors: { 404: "No such revision in this workspace" },
    },
    ({ req, params, query }) => {
      const auth = getAuth(req);
      const after = loadRevision(ctx.db, auth.workspaceId, params.id);
      const before = loadRevision(ctx.db, auth.workspaceId, query.against);
      const diff = diffStacks(stackOf(before.revision), stackOf(after.revision));
      const specMaskChanged =
        JSON.stringify(before.revision.specMask) !== JSON.stringify(after.revision.specMask);
      return {
        ...diff,
        specMaskChanged,
        specDeviation: {
          before: specDeviationSummary(ctx.db, before),
          after: specDeviationSummary(ctx.db, after),
        },
        summary: specMaskChanged ? `${diff.summary}; spec mask changed` : diff.summary,
        before: { id: before.revision.id, number: before.revision.number, hash: before.revision.hash },
        after: { id: after.revision.id, number: after.revision.number, hash: after.revision.hash },
      };
    },
  );

  route(
    router,
    {
      method: "post",
      path: "/imports/design",
      summary:
        "Parse an uploaded design (JSON design file, or CSV material,thickness_nm[,locked]); nothing is stored",
      tag: TAG,
      access: ["designer"],
      multipart: true,
      before: [singleFile],
      body: DesignImportFields.extend({
        file: fileField("JSON design file, or CSV material,thickness_nm[,locked] (at most 1 MB)"),
      }),
      response: ImportDesignResponse,
      errors: {
        413: "File over 1 MB",
        415: "Binary (non-text) file",
        422: "CSV with wrong columns or bad cells (details: row, column, message)",
      },
    },
    ({ req, body }) => {
      const auth = getAuth(req);
      const file = uploadedText(req);
      const warnings: string[] = [];
      const trimmed = file.text.trimStart();
      if (trimmed.startsWith("{")) {
        let json: unknown;
        try {
          json = JSON.parse(file.text);
        } catch (err) {
          throw new HttpError(
            400,
            "malformed_json",
            `${file.name} is not valid JSON: ${err instanceof Error ? err.message : String(err)}`,
          );
        }
        assertWithinLimits(designLimitProblems(json));
        return { stack: resolveDesign(ctx.db, auth.workspaceId, json), warnings };
      }
      const ws = workspaceMaterials(ctx.db, auth.workspaceId);
      const known = (id: string) => MATERIAL_LIBRARY.some((m) => m.id === id) || ws.some((m) => m.id === id);
      const layers = parseLayerCsv(file.text, known);
      assertWithinLimits(designLimitProblems({ layers }));
      const name = body.name || file.name.replace(/\.[^.]+$/, "") || "Imported design";
      let referenceWavelength = body.referenceWavelength;
      if (referenceWavelength === undefined) {
        referenceWavelength = 550;
        warnings.push("No reference wavelength given; 550 nm was used.");
      }
      let substrate = body.substrate;
      if (!substrate) {
        substrate = "boro-crown";
        warnings.push(
          "No substrate given; borosilicate crown glass (boro-crown), 1 mm, back surface counted, was used.",
        );
      } else if (!known(substrate)) {
        throw new HttpError(400, "invalid_design", `Unknown substrate material id "${substrate}".`);
      }
      warnings.push(
        "Layers were read in deposition order: the first row is the layer next to the substrate.",
      );
      const stack = resolveDesign(ctx.db, auth.workspaceId, {
        format: DESIGN_FORMAT,
        name,
        referenceWavelength,
        incident: body.incident || "air",
        layers,
        substrate: { material: substrate, thicknessMm: body.substrateThicknessMm ?? 1, backside: true },
        exit: "air",
      });
      return { stack, warnings };
    },
  );
}
