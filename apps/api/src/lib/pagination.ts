// Keyset pagination for lists: `?limit=` (default 50, max 200) and `?cursor=` → `{ items, nextCursor }`.
//
// Usage (newest first, ties broken by id):
//   route(router, { ..., query: pageQuery, response: pageSchema(Item) }, ({ query }) => {
//     const rows = ctx.db.select().from(t)
//       .where(and(eq(t.workspaceId, ws), keysetWhere([t.createdAt, t.id], query.cursor, "desc")))
//       .orderBy(desc(t.createdAt), desc(t.id))
//       .limit(query.limit + 1)
//       .all();
//     return toPage(rows, query.limit, (r) => [r.createdAt, r.id], toItem);
//   });
import { sql, type SQL } from "drizzle-orm";
import type { SQLiteColumn } from "drizzle-orm/sqlite-core";
import type { z } from "zod";
import type { PageQuery as ContractPageQuery, Page } from "@stackproof/contracts";
import { HttpError } from "./errors.ts";

/** Query schema for a paginated list (the contracts' PageQuery; extend it there with `.extend({...})` for filters). */
export {
  PageQuery as pageQuery,
  DEFAULT_PAGE_LIMIT as DEFAULT_LIMIT,
  MAX_PAGE_LIMIT as MAX_LIMIT,
} from "@stackproof/contracts";
export type PageQuery = z.infer<typeof ContractPageQuery>;

/** Response schema `{ items: T[], nextCursor: string | null }` and its type live with the contracts. */
export { pageSchema, type Page } from "@stackproof/contracts";

/** A sort-key value as stored in SQLite; Dates are stored as epoch milliseconds (timestamp_ms columns). */
export type CursorValue = string | number | Date;

export function encodeCursor(values: readonly CursorValue[]): string {
  const raw = values.map((v) => (v instanceof Date ? v.getTime() : v));
  return Buffer.from(JSON.stringify(raw), "utf8").toString("base64url");
}

/** Decodes a cursor made by encodeCursor; 400 `invalid_cursor` when it is not one with `arity` values. */
export function decodeCursor(cursor: string, arity: number): (string | number)[] {
  let parsed: unknown;
  try {
    parsed = JSON.parse(Buffer.from(cursor, "base64url").toString("utf8"));
  } catch {
    parsed = undefined;
  }
  if (
    !Array.isArray(parsed) ||
    parsed.length !== arity ||
    !parsed.every((v) => typeof v === "string" || (typeof v === "number" && Number.isFinite(v)))
  ) {
    throw new HttpError(
      400,
      "invalid_cursor",
      "The list cursor is not valid; start again from the first page.",
    );
  }
  return parsed as (string | number)[];
}

/**
 * The WHERE condition selecting rows strictly after `cursor` in the order given by `columns`
 * (lexicographic, all ascending or all descending). Undefined when there is no cursor.
 */
export function keysetWhere(
  columns: readonly SQLiteColumn[],
  cursor: string | undefined,
  direction: "asc" | "desc",
): SQL | undefined {
  if (!cursor) return undefined;
  const values = decodeCursor(cursor, columns.length);
  const op = direction === "asc" ? sql.raw(">") : sql.raw("<");
  const alternatives: SQL[] = [];
  for (let i = 0; i < columns.length; i++) {
    const parts: SQL[] = [];
    for (let j = 0; j < i; j++) parts.push(sql`${columns[j]} = ${values[j]}`);
    parts.push(sql`${columns[i]} ${op} ${values[i]}`);
    alternatives.push(sql`(${sql.join(parts, sql` AND `)})`);
  }
  return sql`(${sql.join(alternatives, sql` OR `)})`;
}

/**
 * Turns `limit + 1` fetched rows into a page: the first `limit` items and, when there was one more row,
 * the cursor after the last item returned.
 */
export function toPage<Row, Item>(
  rows: readonly Row[],
  limit: number,
  cursorOf: (row: Row) => readonly CursorValue[],
  toItem: (row: Row) => Item,
): Page<Item> {
  const pageRows = rows.slice(0, limit);
  const last = pageRows[pageRows.length - 1];
  return {
    items: pageRows.map(toItem),
    nextCursor: rows.length > limit && last !== undefined ? encodeCursor(cursorOf(last)) : null,
  };
}
