import { describe, expect, it } from "vitest";
import { decodeCursor, encodeCursor, pageLimit } from "@/server/http/cursor";

describe("list cursors", () => {
  it("round-trip and refuse anything else", () => {
    const c = encodeCursor("2026-12-01T21:00:00.123456Z", "0b7f4a9e-2c41-4a7e-9a55-3f1d2c3b4a5e");
    expect(decodeCursor(c)).toEqual({ at: "2026-12-01T21:00:00.123456Z", id: "0b7f4a9e-2c41-4a7e-9a55-3f1d2c3b4a5e" });
    expect(() => decodeCursor("garbage")).toThrow(/cursor/);
    expect(pageLimit(null)).toBe(50);
    expect(() => pageLimit("0")).toThrow(/limit/);
  });
});
