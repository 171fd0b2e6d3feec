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

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const CURSOR_TIME = /^(\d{4})-(\d\d)-(\d\d)T(\d\d):(\d\d):(\d\d)(?:\.(\d{1,6}))?Z$/;

/** A UTC time as the cursors write it, on a day that exists (no 2026-02-31), in years 1 to 9999. */
function isCursorTime(at: string): boolean {
  const m = CURSOR_TIME.exec(at);
  if (!m) return false;
  const [year, month, day, hour, minute, second] = m.slice(1, 7).map(Number);
  if (year < 1 || month < 1 || month > 12 || hour > 23 || minute > 59 || second > 59) return false;
  const daysInMonth = new Date(Date.UTC(2000, month, 0)).getUTCDate() - (month === 2 && !isLeap(year) ? 1 : 0);
  return day >= 1 && day <= daysInMonth;
}
const isLeap = (y: number) => (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;

export function decodeCursor(raw: string | null): Cursor | undefined {
  if (!raw) return undefined;
  const parts = Buffer.from(raw, "base64url").toString("utf8").split("|");
  const [at, id] = parts;
  if (parts.length !== 2 || !id || !at || !isCursorTime(at) || !UUID.test(id)) {
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

export const PAGE_LIMIT_MIN = 1;
export const PAGE_LIMIT_MAX = 200;
export const PAGE_LIMIT_DEFAULT = 50;

/** `limit` query parameter of every list: a whole number from 1 to 200, default 50; anything else is 400. */
export function pageLimit(raw: string | null, fallback = PAGE_LIMIT_DEFAULT): number {
  if (raw === null || raw === "") return fallback;
  const n = /^\d{1,4}$/.test(raw) ? Number(raw) : NaN;
  if (!Number.isInteger(n) || n < PAGE_LIMIT_MIN || n > PAGE_LIMIT_MAX)
    throw new ApiError("bad_request", `limit: must be a whole number from ${PAGE_LIMIT_MIN} to ${PAGE_LIMIT_MAX} (got "${raw.slice(0, 40)}").`, {
      field: "limit",
      min: PAGE_LIMIT_MIN,
      max: PAGE_LIMIT_MAX,
    });
  return n;
}

/**
 * `before` query parameter of the dataset and fit lists: an ISO time (the `createdAt` of the last
 * item of the previous page), in years 1 to 9999 (PostgreSQL's timestamptz range; JavaScript
 * accepts year 0 and beyond). Answers 422 naming `before`, as these lists always have.
 */
export function beforeTime(raw: string | null): Date | null {
  if (raw === null || raw === "") return null;
  const date = /^\d{4}-\d\d-\d\d(T\d\d:\d\d(:\d\d(\.\d{1,9})?)?(Z|[+-]\d\d:?\d\d)?)?$/.test(raw) ? new Date(raw) : new Date(NaN);
  const year = date.getUTCFullYear();
  if (Number.isNaN(date.getTime()) || year < 1 || year > 9999 || !sameCalendarDay(raw, date))
    throw new ApiError("invalid_input", "before: must be an ISO time (the createdAt of the last item of the previous page).", { field: "before" });
  return date;
}
/** `new Date("2026-02-31")` rolls over to March 3; a day that does not exist is refused. */
function sameCalendarDay(raw: string, date: Date): boolean {
  const [y, m, d] = raw.slice(0, 10).split("-").map(Number);
  if (raw.length > 10 && !/Z$/.test(raw)) return m >= 1 && m <= 12 && d >= 1 && d <= new Date(Date.UTC(y, m, 0)).getUTCDate();
  return date.getUTCFullYear() === y && date.getUTCMonth() + 1 === m && date.getUTCDate() === d;
}
