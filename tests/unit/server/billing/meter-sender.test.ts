import Stripe from "stripe";
import { describe, expect, it } from "vitest";
import { backoffMs } from "@/server/billing/config";
import { classifyStripeError, meterValue } from "@/server/billing/meter-sender";

describe("meterValue", () => {
  it("keeps three decimals of compute-seconds without trailing zeros", () => {
    expect(meterValue(12.5)).toBe("12.5");
    expect(meterValue(100)).toBe("100");
    expect(meterValue(0.0004)).toBe("0");
    expect(meterValue(3.1239)).toBe("3.124");
    expect(meterValue(1200)).toBe("1200");
  });
  it("sends 0 for nothing, negative or not-a-number", () => {
    expect(meterValue(0)).toBe("0");
    expect(meterValue(-3)).toBe("0");
    expect(meterValue(Number.NaN)).toBe("0");
  });
});

describe("backoffMs", () => {
  it("doubles from the base and stops at the cap", () => {
    expect(backoffMs(1, 1000, 60_000)).toBe(1000);
    expect(backoffMs(2, 1000, 60_000)).toBe(2000);
    expect(backoffMs(5, 1000, 60_000)).toBe(16_000);
    expect(backoffMs(30, 1000, 60_000)).toBe(60_000);
  });
});

describe("classifyStripeError", () => {
  const invalid = (raw: Record<string, unknown>) =>
    new Stripe.errors.StripeInvalidRequestError({ type: "invalid_request_error", statusCode: 400, ...raw } as never);
  it("treats a duplicate identifier as already recorded (counted once)", () => {
    const err = invalid({ code: "resource_already_exists", param: "identifier", message: "An event already exists with identifier x." });
    expect(classifyStripeError(err)).toEqual({ kind: "already" });
  });
  it("retries when Stripe is unreachable, overloaded or failing", () => {
    expect(classifyStripeError(new Stripe.errors.StripeConnectionError({ message: "socket hang up" } as never)).kind).toBe("retry");
    expect(classifyStripeError(new Stripe.errors.StripeAPIError({ type: "api_error", message: "boom", statusCode: 500 } as never)).kind).toBe("retry");
    expect(classifyStripeError(new Stripe.errors.StripeRateLimitError({ message: "slow down" } as never)).kind).toBe("retry");
  });
  it("fails for good, with Stripe's reason, when the event itself is refused", () => {
    const out = classifyStripeError(
      invalid({ code: "timestamp_too_far_in_past", param: "timestamp", message: "Timestamp must be within the past 35 calendar days." }),
    );
    expect(out.kind).toBe("failed");
    expect(out.kind === "failed" && out.reason).toContain("35 calendar days");
    expect(out.kind === "failed" && out.reason).toContain("timestamp");
  });
});
