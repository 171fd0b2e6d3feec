import { sql, type AnyColumn, type SQL } from "drizzle-orm";
import { ApiError } from "@/server/http/errors";

/**
 * Opaque cursors for newest-first lists: base64url of `<created_at with microseconds>|<id>`.
 * PostgreSQL keeps microseconds, so the cursor carries them too (a JS Date would lose them and
 * skip rows written in the same millisecond, as sweep points are).
 */
export function encodeCursor(createdAtText: string, id: string): string {
  return Buffer.from(`${createdAtText}|${id}`).toString("base64url");
}

export interface Cursor {
  at: string;
  id: string;
}

export function decodeCursor(raw: string | null): Cursor | undefined {
  if (!raw) return undefined;
  const [at, id] = Buffer.from(raw, "base64url").toString("utf8").split("|");
  if (!id || !at || !/^\d{4}-\d\d-\d\dT[\d:.]+Z$/.test(at) || !/^[0-9a-f-]{36}$/i.test(id)) {
    throw new ApiError("bad_request", "cursor: not a cursor this API gave out; pass the `nextCursor` of the previous page.", { field: "cursor" });
  }
  return { at, id };
}

/** created_at as UTC text with microseconds, to put in a cursor. */
export function createdAtText(column: AnyColumn): SQL<string> {
  return sql<string>`to_char(${column} at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"')`;
}

/** Rows strictly after the cursor in newest-first order. */
export function beforeCursor(createdAt: AnyColumn, id: AnyColumn, cursor: Cursor | undefined): SQL | undefined {
  if (!cursor) return undefined;
  return sql`(${createdAt}, ${id}) < (${cursor.at}::timestamptz, ${cursor.id}::uuid)`;
}

/** `limit` query parameter: 1 to 200, default 50. */
export function pageLimit(raw: string | null, fallback = 50): number {
  if (raw === null || raw === "") return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 1 || n > 200)
    throw new ApiError("bad_request", `limit: must be a whole number from 1 to 200 (got "${raw}").`, { field: "limit" });
  return n;
}
