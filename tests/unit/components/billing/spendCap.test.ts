import { describe, expect, it } from "vitest";
import { readSpendCap } from "@/components/billing/spendCap";
import { memberRolesFor, SEAT_ROLES } from "@/shared/permissions";

describe("the spend-cap field", () => {
  it("reads empty as no cap and a number as USD, rounded to cents", () => {
    expect(readSpendCap("  ")).toEqual({ cap: null, problem: null });
    expect(readSpendCap("250")).toEqual({ cap: 250, problem: null });
    expect(readSpendCap(" 12.345 ")).toEqual({ cap: 12.35, problem: null });
  });
  it("refuses text and out-of-range amounts in words, never as no cap", () => {
    for (const bad of ["abc", "12abc", "1e3", "-5", "NaN", "Infinity", "1,000"]) {
      const r = readSpendCap(bad);
      expect(r.cap, bad).toBeUndefined();
      expect(r.problem, bad).toMatch(/^(Enter the monthly cap as a number of USD|The monthly cap must be)/);
      expect(r.problem, bad).not.toMatch(/spendCapUsd/);
    }
    expect(readSpendCap("0.5").problem).toBe("The monthly cap must be at least 1 USD, or empty for no cap.");
    expect(readSpendCap("2000000").problem).toBe("The monthly cap must be at most 1,000,000 USD.");
  });
});

describe("who may invite and remove whom", () => {
  it("Owners any role, Billing admins Researchers and Viewers, others nobody", () => {
    expect(memberRolesFor("owner")).toEqual(["owner", "billing_admin", "researcher", "viewer"]);
    expect(memberRolesFor("billing_admin")).toEqual([...SEAT_ROLES]);
    expect(memberRolesFor("researcher")).toEqual([]);
    expect(memberRolesFor("viewer")).toEqual([]);
  });
});
