// Schemas for the optics engine's JSON inside responses and pages.
import { z } from "zod";
import type {
  BandOutcome,
  Design,
  ErrorModel,
  MaterialModel,
  SpecMask,
  YieldResult,
} from "@stackproof/optics";

/**
 * A JSON value whose shape the optics package owns: the API validated it with the optics schema on the way in
 * (or computed it), so responses carry it typed but not re-checked (re-parsing would apply the optics defaults
 * and could change what the server stored). Hand-written: zod has no "trusted, typed" schema of its own.
 */
const opticsJson = <T>() => z.custom<T>((v) => v !== undefined);

export const DesignJson = opticsJson<Design>();
export const SpecMaskJson = opticsJson<SpecMask>();
export const ErrorModelJson = opticsJson<ErrorModel>();
export const YieldResultJson = opticsJson<YieldResult>();
export const BandOutcomeJson = opticsJson<BandOutcome>();
export const MaterialModelJson = opticsJson<MaterialModel>();

/** Page size of a list when `?limit=` is not given, and the most a request may ask for. */
export const DEFAULT_PAGE_LIMIT = 50;
export const MAX_PAGE_LIMIT = 200;

/** Query of a paginated list: `?limit=` (default 50, at most 200) and `?cursor=` (from the previous page). */
export const PageQuery = z.object({
  limit: z.coerce.number().int().min(1).max(MAX_PAGE_LIMIT).default(DEFAULT_PAGE_LIMIT),
  cursor: z.string().min(1).max(500).optional(),
});

/** A cursor page: `?limit=&cursor=` → `{ items, nextCursor }`. */
export function pageSchema<T extends z.ZodType>(item: T) {
  return z.object({ items: z.array(item), nextCursor: z.string().nullable() });
}

/** `{ items }` without a cursor (short lists the server sends whole). */
export function itemsSchema<T extends z.ZodType>(item: T) {
  return z.object({ items: z.array(item) });
}

export interface Page<T> {
  items: T[];
  nextCursor: string | null;
}

export const PersonRefSchema = z.object({ id: z.string(), name: z.string() });
export type PersonRef = z.infer<typeof PersonRefSchema>;
