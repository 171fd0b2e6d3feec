/**
 * Billing settings that are not plan figures (those live in src/shared/plans.ts): names of the
 * Stripe objects Triskel creates, the grace period after a failed payment, the meter sender's
 * batches and back-off. Figures here are configuration, read by code, never repeated as literals
 * elsewhere. The sender's pace and lease are environment variables (METER_SENDER_INTERVAL_MS,
 * METER_SENDER_LEASE_SECONDS in src/env.ts).
 */
export const STRIPE_OBJECTS = {
  seatProductId: "triskel_lab_seat",
  computeProductId: "triskel_compute",
  /** Lookup keys find the current prices without storing their ids. */
  seatPriceLookupKey: "triskel_lab_seat_monthly",
  computePriceLookupKey: "triskel_compute_seconds_metered",
  /** The billing meter: event name and aggregation. */
  meterEventName: "compute_seconds",
  meterDisplayName: "Triskel compute-seconds",
} as const;

export const BILLING_RULES = {
  /** Days a workspace keeps Lab limits after a failed payment before it works under Free limits. */
  graceDays: 7,
  /** Spend-cap notices, as fractions of the cap (product: 80 % and 100 %). */
  spendCapNoticeFractions: [0.8, 1] as const,
};

export const METER_SENDER = {
  batchSize: 50,
  /** Retry delay after a temporary failure: base * 2^(attempts-1), capped. */
  backoffBaseMs: 1000,
  backoffMaxMs: 60_000,
};

/** Delay before the next attempt after `attempts` temporary failures (pure, tested). */
export function backoffMs(attempts: number, base = METER_SENDER.backoffBaseMs, max = METER_SENDER.backoffMaxMs): number {
  return Math.min(max, base * 2 ** Math.max(0, attempts - 1));
}
