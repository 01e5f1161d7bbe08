import { sql, type AnyColumn, type SQL } from "drizzle-orm";
import { encodeCursor, type Cursor } from "@/lib/schemas/paging";

export type SortOrder = "asc" | "desc";

export interface Keyset {
  column: AnyColumn;
  /** SQL type the cursor's text key is cast to for comparison ("timestamptz", "text"). */
  type: "timestamptz" | "text";
  id: AnyColumn;
  order: SortOrder;
}

/**
 * The sort key as PostgreSQL's own text (timestamps keep their microseconds; a JavaScript Date would round them
 * and a page boundary inside one millisecond would skip rows).
 */
export const keysetText = (keyset: Keyset) => sql<string>`${keyset.column}::text`;

/** Rows strictly after the cursor in the keyset's order (row comparison on (key, id), so ties never repeat or vanish). */
export function afterCursor(keyset: Keyset, cursor: Cursor | undefined): SQL | undefined {
  if (!cursor) return undefined;
  const key = keyset.type === "timestamptz" ? sql`${cursor.key}::timestamptz` : sql`${cursor.key}::text`;
  return keyset.order === "desc" ? sql`(${keyset.column}, ${keyset.id}) < (${key}, ${cursor.id})` : sql`(${keyset.column}, ${keyset.id}) > (${key}, ${cursor.id})`;
}

export function keysetOrder(keyset: Keyset): SQL[] {
  return keyset.order === "desc" ? [sql`${keyset.column} desc`, sql`${keyset.id} desc`] : [sql`${keyset.column} asc`, sql`${keyset.id} asc`];
}

/** Fetch `limit + 1` rows, then call this: the extra row only tells whether there is a next page. */
export function pageFrom<Row extends { sortKey: string; id: string }>(rows: Row[], limit: number): { rows: Omit<Row, "sortKey">[]; nextCursor: string | null } {
  const visible = rows.slice(0, limit);
  const last = visible[visible.length - 1];
  return {
    rows: visible.map(({ sortKey: _sortKey, ...row }) => row),
    nextCursor: rows.length > limit && last ? encodeCursor({ key: last.sortKey, id: last.id }) : null,
  };
}

/** `%word%` for ILIKE with the pattern characters of the word taken literally. */
export const containsPattern = (word: string) => `%${word.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
