/**
 * Plan figures (product.md "Plans"; demo figures, invented). Kept here as configuration:
 * code reads limits from this table, never from literals. One table for both sides: the server
 * enforces it (src/server/billing) and the browser shows it (pricing, cost lines, editor limits).
 */
import { COST_CONSTANTS } from "@/engine/browser";

export type PlanId = "free" | "lab";

export interface PlanLimits {
  id: PlanId;
  label: string;
  /** Price per seat and month, USD. */
  seatPriceUsdPerMonth: number;
  /** Metered price of compute, USD per compute-hour. */
  computePriceUsdPerHour: number;
  /** Compute included each month, seconds (0: every second is metered). */
  includedComputeSeconds: number;
  /** Largest network, cells along each side (columns and rows). */
  maxCellsPerSide: number;
  maxSweepPoints: number;
  maxEnsembleSamples: number;
  /**
   * Largest estimated compute time of one job (a run, one sweep point, a whole fit), seconds.
   * Lab's is the engine's own limit (COST_CONSTANTS.computeSecondsLimit), so no plan allows more.
   */
  maxJobComputeSeconds: number;
  /** BullMQ priority: lower numbers run first. */
  queuePriority: number;
  queuePriorityLabel: "low" | "normal";
  /** Members allowed; null means "as many as seats bought". */
  maxMembers: number | null;
  /** Most seats one workspace may buy (0 on Free, which has no seats to buy). */
  maxSeats: number;
}

export const PLANS: Record<PlanId, PlanLimits> = {
  free: {
    id: "free",
    label: "Free",
    seatPriceUsdPerMonth: 0,
    computePriceUsdPerHour: 0,
    includedComputeSeconds: 30 * 60,
    maxCellsPerSide: 40,
    maxSweepPoints: 100,
    maxEnsembleSamples: 50,
    maxJobComputeSeconds: 10 * 60,
    queuePriority: 10,
    queuePriorityLabel: "low",
    maxMembers: 1,
    maxSeats: 0,
  },
  lab: {
    id: "lab",
    label: "Lab",
    seatPriceUsdPerMonth: 24,
    computePriceUsdPerHour: 0.6,
    includedComputeSeconds: 0,
    maxCellsPerSide: 400,
    maxSweepPoints: 20_000,
    maxEnsembleSamples: 1_000,
    maxJobComputeSeconds: COST_CONSTANTS.computeSecondsLimit,
    queuePriority: 1,
    queuePriorityLabel: "normal",
    maxMembers: null,
    maxSeats: 200,
  },
};

/** The monthly spend cap's bounds in USD (PUT /api/v1/billing/spend-cap and the Billing page's form); null means no cap. */
export const SPEND_CAP_USD = { min: 1, max: 1_000_000 } as const;

/** Where a subscription stands: paid up, paying late (grace: Lab limits stay), or suspended. */
export type PlanState = "active" | "grace" | "suspended";

/**
 * The plan whose limits, quota, price and queue priority apply now: a suspended Lab workspace works
 * under Free (docs/billing.md); grace keeps Lab. Every check of a submission uses this one.
 */
export function effectivePlan(plan: PlanId, planState: PlanState): PlanId {
  return planState === "suspended" ? "free" : plan;
}

/** Cost in USD of some compute-seconds on a plan (before included minutes). */
export function computeCostUsd(plan: PlanId, computeSeconds: number): number {
  return (computeSeconds / 3600) * PLANS[plan].computePriceUsdPerHour;
}
