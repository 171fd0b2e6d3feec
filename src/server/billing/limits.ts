/**
 * Plan limits at submission (product.md "Plans"; figures in src/shared/plans.ts). On Free, a job
 * over a limit answers 402 (the Lab plan allows more); on Lab, where no plan allows more, 422.
 * The message names the limit and its value.
 */
import { PLANS, type PlanId } from "@/shared/plans";
import { formatComputeTime } from "@/shared/format";
import { ApiError } from "@/server/http/errors";

export type PlanLimitName = "maxCellsPerSide" | "maxSweepPoints" | "maxEnsembleSamples" | "maxJobComputeSeconds";

const count = (x: number) => x.toLocaleString("en-US");

function refuse(plan: PlanId, limit: PlanLimitName, value: number, requested: number, what: string, format = count, unit?: string): never {
  const p = PLANS[plan];
  const lab = PLANS.lab;
  const upgrade = plan === "free" && lab[limit] > p[limit] ? ` The ${lab.label} plan allows ${format(lab[limit])}.` : "";
  throw new ApiError(
    plan === "free" ? "payment_required" : "invalid_input",
    `${what} is ${format(requested)}, over the ${p.label} plan's limit ${limit} = ${format(value)}.${upgrade}`,
    { limit, value, requested, plan, ...(unit ? { unit } : {}) },
  );
}

/**
 * The per-job compute-time cap: one run, one sweep point or one whole fit whose estimate is over
 * the plan's maxJobComputeSeconds is refused before anything is written (dry runs too).
 */
export function assertJobComputeWithinPlan(plan: PlanId, estimatedSeconds: number, what: string): void {
  const max = PLANS[plan].maxJobComputeSeconds;
  if (estimatedSeconds > max)
    refuse(plan, "maxJobComputeSeconds", max, estimatedSeconds, `${what}: the estimated compute time`, formatComputeTime, "compute-seconds");
}

export function assertNetworkWithinPlan(plan: PlanId, size: { columns: number; rows: number }, where = "network.size"): void {
  const max = PLANS[plan].maxCellsPerSide;
  if (size.columns > max) refuse(plan, "maxCellsPerSide", max, size.columns, `${where}.columns`);
  if (size.rows > max) refuse(plan, "maxCellsPerSide", max, size.rows, `${where}.rows`);
}

export function assertSweepWithinPlan(plan: PlanId, gridPoints: number, ensembleSamples: number): void {
  const p = PLANS[plan];
  if (gridPoints > p.maxSweepPoints) refuse(plan, "maxSweepPoints", p.maxSweepPoints, gridPoints, "The sweep's number of points");
  if (ensembleSamples > p.maxEnsembleSamples) refuse(plan, "maxEnsembleSamples", p.maxEnsembleSamples, ensembleSamples, "ensemble.samples");
}

/** BullMQ priority of a plan's jobs (lower runs first). */
export function queuePriority(plan: PlanId): number {
  return PLANS[plan].queuePriority;
}

/** The engine's own ensemble (`computation.ensemble.samples`) against the plan's limit. */
export function assertEnsembleWithinPlan(plan: PlanId, input: { computation: unknown }): void {
  const samples = (input.computation as { ensemble?: { samples?: number } })?.ensemble?.samples;
  const max = PLANS[plan].maxEnsembleSamples;
  if (typeof samples === "number" && samples > max) refuse(plan, "maxEnsembleSamples", max, samples, "computation.ensemble.samples");
}
