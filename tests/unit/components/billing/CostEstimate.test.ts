import { describe, expect, it } from "vitest";
import { estimateCost, formatComputeSeconds, formatUsd } from "@/components/billing/CostEstimate";

describe("cost estimate", () => {
  it("prices Lab compute at the configured rate and Free compute at zero", () => {
    expect(estimateCost(3600, "lab").costUsd).toBeCloseTo(0.6, 10);
    expect(estimateCost(90, "lab").note).toContain("0.60 USD per compute-hour");
    expect(estimateCost(3600, "free").costUsd).toBe(0);
    expect(estimateCost(3600, "free").note).toContain("30 compute-minutes");
    expect(estimateCost(-5, "lab").computeSeconds).toBe(0);
  });
  it("formats compute and money with units", () => {
    expect(formatComputeSeconds(42)).toBe("42 compute-seconds");
    expect(formatComputeSeconds(600)).toBe("10.0 compute-minutes");
    expect(formatComputeSeconds(10_800)).toBe("3.00 compute-hours");
    expect(formatUsd(0.004)).toBe("< 0.01 USD");
    expect(formatUsd(12)).toBe("12.00 USD");
  });
});
