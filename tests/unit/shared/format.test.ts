import { describe, expect, it } from "vitest";
import { formatComputeSeconds, formatComputeTime } from "@/shared/format";

describe("compute time in words (one formatter for messages and screens)", () => {
  it("states whole compute-seconds with the larger unit the screens use beside them", () => {
    expect(formatComputeTime(600)).toBe(`600 compute-seconds (${formatComputeSeconds(600)})`);
    expect(formatComputeTime(600)).toBe("600 compute-seconds (10.0 compute-minutes)");
    expect(formatComputeTime(21_600)).toBe("21,600 compute-seconds (6.00 compute-hours)");
    expect(formatComputeTime(6031.4)).toBe("6,031 compute-seconds (100.5 compute-minutes)");
  });
  it("short times are compute-seconds alone", () => {
    expect(formatComputeTime(42)).toBe("42 compute-seconds");
    expect(formatComputeTime(0.25)).toBe("0.25 compute-seconds");
  });
});
