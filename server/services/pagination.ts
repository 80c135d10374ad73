/**
 * Keyset pagination helpers for the list routes (contract:
 * shared/schemas/pagination.ts). A cursor is the base64url JSON of the sort
 * key (an array of strings and numbers) of the last item of a page.
 */
import { asc, desc, sql, type SQL, type SQLWrapper } from "drizzle-orm";
import { badRequest } from "@/server/http-error";
import { PAGE_SIZE, type Page, type PageQuery } from "@/shared/schemas/pagination";

export type SortKey = (string | number)[];

export function encodeCursor(key: SortKey): string {
  return Buffer.from(JSON.stringify(key), "utf8").toString("base64url");
}

/** The sort key in a cursor; 400 naming `cursor` when it is not one this server wrote (with `length` parts). */
export function decodeCursor(cursor: string, length?: number): SortKey {
  let key: unknown;
  try {
    key = JSON.parse(Buffer.from(cursor, "base64url").toString("utf8"));
  } catch {
    key = null;
  }
  if (
    !Array.isArray(key) ||
    key.length === 0 ||
    (length !== undefined && key.length !== length) ||
    !key.every((k) => typeof k === "string" || (typeof k === "number" && Number.isFinite(k)))
  )
    throw badRequest(
      "Invalid query: cursor: not a cursor from this list; start again without it.",
      [{ path: "cursor", message: "not a cursor from this list" }],
      "invalid",
    );
  return key as SortKey;
}

export function pageLimit(q: PageQuery): number {
  return q.limit ?? PAGE_SIZE;
}

/** From `limit + 1` rows fetched after the cursor: the page and the next cursor. */
export function pageFromRows<R, T>(
  rows: R[],
  limit: number,
  keyOf: (r: R) => SortKey,
  map: (rows: R[]) => T[],
): Page<T> {
  const page = rows.slice(0, limit);
  return { items: map(page), nextCursor: rows.length > limit ? encodeCursor(keyOf(page[page.length - 1])) : null };
}

/** One column of a keyset: the column (or SQL expression), its direction and the type of its values. */
export type KeyColumn = { col: SQLWrapper; dir: "asc" | "desc"; type: "number" | "string" };

/**
 * SQL keyset paging over fixed columns (the last one unique, e.g. the id): `orderBy` for the query,
 * `after(cursor)` the condition "sorts after the cursor's row" (400 naming `cursor` for a bad one), and
 * `page(rows, q, keyOf, map)` the answer from `limit + 1` rows. Keys are the raw column values (a time as
 * epoch milliseconds), so only one page of rows is ever read.
 */
export function keyset(columns: KeyColumn[]) {
  const orderBy = columns.map((c) => (c.dir === "asc" ? asc(c.col as SQL) : desc(c.col as SQL)));
  function after(cursor: string | undefined): SQL | undefined {
    if (!cursor) return undefined;
    const key = decodeCursor(cursor, columns.length);
    if (!key.every((v, i) => typeof v === columns[i].type))
      throw badRequest(
        "Invalid query: cursor: not a cursor from this list; start again without it.",
        [{ path: "cursor", message: "not a cursor from this list" }],
        "invalid",
      );
    // (c1 > v1) OR (c1 = v1 AND ((c2 > v2) OR (c2 = v2 AND ...))), with < for descending columns.
    let cond: SQL | undefined;
    for (let i = columns.length - 1; i >= 0; i--) {
      const { col, dir } = columns[i];
      const beyond = dir === "asc" ? sql`${col} > ${key[i]}` : sql`${col} < ${key[i]}`;
      cond = cond ? sql`(${beyond} OR (${col} = ${key[i]} AND ${cond}))` : sql`(${beyond})`;
    }
    return cond;
  }
  return {
    orderBy,
    after,
    page<R, T>(rows: R[], q: PageQuery, keyOf: (r: R) => SortKey, map: (rows: R[]) => T[]): Page<T> {
      return pageFromRows(rows, pageLimit(q), keyOf, map);
    },
  };
}
