import { describe, expect, it } from "vitest";
import { beforeTime, decodeCursor, encodeCursor, pageLimit } from "@/server/http/cursor";
import { ApiError } from "@/server/http/errors";

const ID = "0b7f4a9e-2c41-4a7e-9a55-3f1d2c3b4a5e";

function refusal(f: () => unknown): ApiError {
  try {
    f();
  } catch (err) {
    if (err instanceof ApiError) return err;
    throw err;
  }
  throw new Error("expected an ApiError");
}

describe("list cursors", () => {
  it("round-trip and refuse anything else", () => {
    const c = encodeCursor("2026-12-01T21:00:00.123456Z", ID);
    expect(decodeCursor(c)).toEqual({ at: "2026-12-01T21:00:00.123456Z", id: ID });
    expect(() => decodeCursor("garbage")).toThrow(/cursor/);
    expect(pageLimit(null)).toBe(50);
    expect(() => pageLimit("0")).toThrow(/limit/);
  });

  it("refuse a date that has the right shape but does not exist, and ids that only look like uuids", () => {
    for (const at of [
      "2026-02-31T00:00:00.000000Z",
      "2026-02-29T00:00:00Z",
      "2026-13-01T00:00:00Z",
      "2026-04-31T00:00:00Z",
      "0000-01-01T00:00:00Z",
      "2026-01-01T24:00:00Z",
      "2026-01-01T00:61:00Z",
      "2026-01-01T00:00:00.1234567Z",
      "2026-01-01T::::Z",
    ]) {
      const e = refusal(() => decodeCursor(encodeCursor(at, ID)));
      expect(e.code, at).toBe("bad_request");
      expect(e.details).toEqual({ field: "cursor" });
    }
    for (const id of ["-".repeat(36), "0b7f4a9e2c414a7e9a553f1d2c3b4a5e----", "0b7f4a9e-2c41-4a7e-9a55-3f1d2c3b4a5g"])
      expect(refusal(() => decodeCursor(encodeCursor("2026-01-01T00:00:00.000000Z", id))).code, id).toBe("bad_request");
    expect(refusal(() => decodeCursor(Buffer.from(`2026-01-01T00:00:00Z|${ID}|x`).toString("base64url"))).code).toBe("bad_request");
    // Leap days that exist are fine.
    expect(decodeCursor(encodeCursor("2024-02-29T23:59:59.999999Z", ID))?.at).toBe("2024-02-29T23:59:59.999999Z");
    expect(decodeCursor(encodeCursor("2000-02-29T00:00:00Z", ID))?.at).toBe("2000-02-29T00:00:00Z");
    expect(() => decodeCursor(encodeCursor("1900-02-29T00:00:00Z", ID))).toThrow(/cursor/);
  });

  it("limit: 1 to 200 everywhere, 400 naming limit and the range", () => {
    expect(pageLimit("1")).toBe(1);
    expect(pageLimit("200")).toBe(200);
    for (const raw of ["-5", "99999", "201", "0", "1.5", "1e2", " 5", "0x10", "abc", "NaN", "Infinity", "5\u0000"]) {
      const e = refusal(() => pageLimit(raw));
      expect(e.code, raw).toBe("bad_request");
      expect(e.status).toBe(400);
      expect(e.message).toMatch(/^limit: must be a whole number from 1 to 200/);
      expect(e.details).toMatchObject({ field: "limit", min: 1, max: 200 });
    }
  });

  it("before: an ISO time PostgreSQL can hold, on a day that exists", () => {
    expect(beforeTime(null)).toBeNull();
    expect(beforeTime("2026-12-01T21:00:00.123Z")?.toISOString()).toBe("2026-12-01T21:00:00.123Z");
    expect(beforeTime("2026-12-01")?.toISOString()).toBe("2026-12-01T00:00:00.000Z");
    expect(beforeTime("2026-12-01T22:00:00+01:00")?.toISOString()).toBe("2026-12-01T21:00:00.000Z");
    for (const raw of [
      "0000-01-01T00:00:00Z",
      "2026-02-31T00:00:00Z",
      "2026-02-31",
      "+275760-09-13T00:00:00Z",
      "-000001-01-01T00:00:00Z",
      "yesterday",
      "Dec 1 2026",
      "2026-13-01",
      "2026-02-31T00:00:00+01:00",
    ]) {
      const e = refusal(() => beforeTime(raw));
      expect(e.code, raw).toBe("invalid_input");
      expect(e.details).toEqual({ field: "before" });
    }
  });
});
