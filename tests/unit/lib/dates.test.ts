// One date format in the app (src/lib/units.ts: when, day): moments as "2026-12-04 01:20 UTC",
// days as "2026-12-04"; and no page or table formats a date any other way.
import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { day, when } from "@/lib/units";

const ROOT = path.resolve(__dirname, "../../..");
function files(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = path.join(dir, name);
    return statSync(p).isDirectory() ? files(p) : /\.(ts|tsx)$/.test(name) ? [p] : [];
  });
}

describe("the app's date format", () => {
  it("a moment in UTC with a 24-hour clock, a day in ISO order, whatever the offset it was written with", () => {
    expect(when("2026-12-04T01:20:59.999Z")).toBe("2026-12-04 01:20 UTC");
    expect(when("2026-12-04T09:05:00+08:00")).toBe("2026-12-04 01:05 UTC");
    expect(when("2026-03-01T23:59:00-02:00")).toBe("2026-03-02 01:59 UTC");
    expect(day("2026-12-01T00:00:00.000Z")).toBe("2026-12-01");
    expect(day("2026-12-31T23:30:00-01:00")).toBe("2027-01-01");
    expect(when(null)).toBe("–");
    expect(day(undefined)).toBe("–");
    expect(when("not a date")).toBe("not a date");
  });
  it("no page, component or browser helper formats a date with the browser's locale or another format", () => {
    const offenders: string[] = [];
    const pattern = /toLocaleDateString|toLocaleTimeString|toUTCString|toGMTString|Intl\.DateTimeFormat|new Date\([^)]*\)\.toLocaleString/;
    for (const dir of ["src/components", "src/app", "src/lib"])
      for (const f of files(path.join(ROOT, dir))) {
        readFileSync(f, "utf8")
          .split("\n")
          .forEach((line, i) => {
            if (pattern.test(line)) offenders.push(`${path.relative(ROOT, f)}:${i + 1}: ${line.trim()}`);
          });
      }
    expect(offenders).toEqual([]);
  });
});
