// Workspace materials and how designs use them: a revision embeds every workspace material it refers to
// as a design-local material, so the stored stack is self-contained and its hash covers the constants.
import { eq } from "drizzle-orm";
import {
  MATERIAL_LIBRARY,
  MaterialSchema,
  parseDesign,
  type Design,
  type Material,
} from "@stackproof/optics";
import { materials } from "../db/schema.ts";
import type { DbOrTx } from "../lib/audit.ts";
import { HttpError } from "../lib/errors.ts";

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
