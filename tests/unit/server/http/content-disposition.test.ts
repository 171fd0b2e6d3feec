import { describe, expect, it } from "vitest";
import { attachment } from "@/server/http/content-disposition";

/** What a client reading RFC 6266 gets: filename* when present, else filename. */
function nameOf(header: string): string {
  const star = /filename\*=UTF-8''([^;]+)/.exec(header);
  if (star) return decodeURIComponent(star[1]);
  return /filename="([^"]*)"/.exec(header)![1];
}

describe("Content-Disposition for downloads", () => {
  it("ASCII names stay a plain filename parameter", () => {
    expect(attachment("lk07.csv")).toBe('attachment; filename="lk07.csv"');
    expect(attachment("triskel-sweep-1.csv")).toBe('attachment; filename="triskel-sweep-1.csv"');
  });

  it("any Unicode name: a Latin-1-safe header, an ASCII fallback and the exact name in filename*", () => {
    for (const name of ["Messung-Größe-µ.csv", "数据.csv", 'naïve "quoted" 100%.csv', "emoji 💥.csv", "a;b,c'd(e)*.csv", "back\\slash.csv"]) {
      const header = attachment(name);
      // A Headers object refuses values outside Latin-1 and line breaks; this must not throw.
      expect(() => new Headers({ "content-disposition": header }), name).not.toThrow();
      expect(
        [...header].every((c) => c.charCodeAt(0) >= 0x20 && c.charCodeAt(0) < 0x7f),
        name,
      ).toBe(true);
      expect(nameOf(header), name).toBe(name);
      const fallback = /filename="([^"]*)"/.exec(header)![1];
      expect(fallback).not.toMatch(/["\\%]/);
    }
    expect(attachment("Messung-Größe-µ.csv")).toBe(`attachment; filename="Messung-Gro_e-_.csv"; filename*=UTF-8''Messung-Gr%C3%B6%C3%9Fe-%C2%B5.csv`);
    expect(attachment("数据.csv")).toBe(`attachment; filename="__.csv"; filename*=UTF-8''%E6%95%B0%E6%8D%AE.csv`);
  });

  it("control characters are dropped; an empty name falls back", () => {
    expect(attachment("a\r\nb\u0000.csv")).toBe('attachment; filename="ab.csv"');
    expect(attachment("\u0000", "dataset.csv")).toBe('attachment; filename="dataset.csv"');
  });
});
