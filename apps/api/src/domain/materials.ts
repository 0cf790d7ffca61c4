// Workspace materials and how designs use them: a revision embeds every workspace material it refers to
// as a design-local material, so the stored stack is self-contained and its hash covers the constants.
import { and, eq } from "drizzle-orm";
import {
  MATERIAL_LIBRARY,
  MaterialSchema,
  parseDesign,
  type Design,
  type Material,
} from "@stackproof/optics";
import type { Db } from "../db/client.ts";
import { materials } from "../db/schema.ts";
import { recordAudit, type DbOrTx } from "../lib/audit.ts";
import { HttpError, conflict } from "../lib/errors.ts";
import { newId } from "./canonical.ts";
import type { Actor } from "./deps.ts";

export function workspaceMaterials(db: DbOrTx, workspaceId: string): Material[] {
  return db
    .select()
    .from(materials)
    .where(eq(materials.workspaceId, workspaceId))
    .all()
    .map((m) =>
      MaterialSchema.parse({
        id: m.materialId,
        name: m.name,
        role: m.role,
        source: m.source,
        model: m.model,
      }),
    );
}

export const isBuiltIn = (id: string): boolean => MATERIAL_LIBRARY.some((m) => m.id === id);

function referencedIds(input: Record<string, unknown>): string[] {
  const ids = new Set<string>();
  const add = (v: unknown) => {
    if (typeof v === "string" && v.length > 0) ids.add(v);
  };
  add(input.incident ?? "air");
  add(input.exit ?? "air");
  const substrate = input.substrate as Record<string, unknown> | undefined;
  if (substrate && typeof substrate === "object") add(substrate.material);
  if (Array.isArray(input.layers)) {
    for (const l of input.layers)
      if (l && typeof l === "object") add((l as Record<string, unknown>).material);
  }
  return [...ids];
}

/**
 * Validate a design (the optics JSON format) for this workspace: material ids that are neither design-local
 * nor built-in are looked up among the workspace materials and embedded in `materials`.
 * Invalid input → 400 `invalid_design` with the optics package's message (field path and value).
 */
export function resolveDesign(db: DbOrTx, workspaceId: string, input: unknown): Design {
  if (!input || typeof input !== "object" || Array.isArray(input)) {
    throw new HttpError(
      400,
      "invalid_design",
      "The design must be a JSON object in the stackproof.design/v1 format.",
    );
  }
  const obj = input as Record<string, unknown>;
  const local = Array.isArray(obj.materials) ? (obj.materials as unknown[]) : [];
  const localIds = new Set(
    local.map((m) => (m && typeof m === "object" ? (m as Record<string, unknown>).id : undefined)),
  );
  const missing = referencedIds(obj).filter((id) => !localIds.has(id) && !isBuiltIn(id));
  let withMaterials: Record<string, unknown> = obj;
  if (missing.length > 0) {
    const ws = workspaceMaterials(db, workspaceId);
    const found = ws.filter((m) => missing.includes(m.id));
    if (found.length > 0) withMaterials = { ...obj, materials: [...local, ...found] };
  }
  try {
    return parseDesign(withMaterials);
  } catch (err) {
    if (err instanceof RangeError) throw new HttpError(400, "invalid_design", `Design: ${err.message}`);
    throw err;
  }
}

/** 409 when `id` is a built-in material's (checked before an upload is read, and again when storing). */
export function assertNotBuiltIn(id: string): void {
  if (isBuiltIn(id)) throw conflict(`"${id}" is a built-in material id; choose another id.`);
}

/**
 * Stores an uploaded material in the workspace: 409 for a built-in id or one the workspace already has (materials
 * are never replaced: stored revisions embed their constants, and the id must keep meaning the same). Returns it as
 * listed.
 */
export function createMaterial(db: Db, input: { workspaceId: string; actor: Actor; material: Material }) {
  const { workspaceId, actor, material } = input;
  assertNotBuiltIn(material.id);
  const id = newId();
  db.transaction((tx) => {
    const taken = tx
      .select({ id: materials.id })
      .from(materials)
      .where(and(eq(materials.workspaceId, workspaceId), eq(materials.materialId, material.id)))
      .get();
    if (taken)
      throw conflict(
        `The workspace already has a material "${material.id}"; materials are not replaced, choose another id.`,
      );
    tx.insert(materials)
      .values({
        id,
        workspaceId,
        materialId: material.id,
        name: material.name,
        role: material.role,
        source: material.source,
        model: material.model,
        createdBy: actor.id,
      })
      .run();
    recordAudit(tx, {
      workspaceId,
      actorId: actor.id,
      action: "material.created",
      subjectType: "material",
      subjectId: id,
      summary: `${actor.name} uploaded the material ${material.id} (${material.name})`,
    });
  });
  const row = db.select().from(materials).where(eq(materials.id, id)).get();
  return {
    id: material.id,
    name: material.name,
    role: material.role,
    source: material.source,
    builtIn: false,
    model: material.model,
    createdAt: row ? row.createdAt.toISOString() : new Date().toISOString(),
  };
}
