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

/** What each limit counts, in words (the message never quotes a field or limit name; `details.limit` carries it). */
const PER: Record<PlanLimitName, string> = {
  maxCellsPerSide: "cells per side",
  maxSweepPoints: "points per scan",
  maxEnsembleSamples: "disorder seeds per ensemble",
  maxJobComputeSeconds: "per job",
};

function refuse(plan: PlanId, limit: PlanLimitName, value: number, requested: number, what: string, format = count, unit?: string): never {
  const p = PLANS[plan];
  const lab = PLANS.lab;
  const upgrade =
    plan === "free" && lab[limit] > p[limit]
      ? ` The ${lab.label} plan allows ${format(lab[limit])} ${PER[limit]}; an Owner or Billing admin can upgrade the group on its Billing page.`
      : "";
  throw new ApiError(
    plan === "free" ? "payment_required" : "invalid_input",
    `${what}, over the ${p.label} plan's limit of ${format(value)} ${PER[limit]}.${upgrade}`,
    {
      limit,
      value,
      requested,
      plan,
      ...(unit ? { unit } : {}),
    },
  );
}

/**
 * The per-job compute-time cap: one calculation, one scan point or one whole fit whose estimate is
 * over the plan's maxJobComputeSeconds is refused before anything is written (dry runs too).
 */
export function assertJobComputeWithinPlan(plan: PlanId, estimatedSeconds: number, what: string): void {
  const max = PLANS[plan].maxJobComputeSeconds;
  if (estimatedSeconds > max)
    refuse(
      plan,
      "maxJobComputeSeconds",
      max,
      estimatedSeconds,
      `${what}: the estimated compute time is ${formatComputeTime(estimatedSeconds)}`,
      formatComputeTime,
      "compute-seconds",
    );
}

/** `where` names the network in the message when it is one of many ("point 3: network.size"). */
export function assertNetworkWithinPlan(plan: PlanId, size: { columns: number; rows: number }, where = "network.size"): void {
  const max = PLANS[plan].maxCellsPerSide;
  const lead = where.replace(/network\.size$/, "");
  const what = `${lead}${lead ? "the" : "The"} network is ${count(size.columns)} × ${count(size.rows)} cells`;
  if (size.columns > max) refuse(plan, "maxCellsPerSide", max, size.columns, what);
  if (size.rows > max) refuse(plan, "maxCellsPerSide", max, size.rows, what);
}

export function assertSweepWithinPlan(plan: PlanId, gridPoints: number, ensembleSamples: number): void {
  const p = PLANS[plan];
  if (gridPoints > p.maxSweepPoints) refuse(plan, "maxSweepPoints", p.maxSweepPoints, gridPoints, `The scan has ${count(gridPoints)} points`);
  if (ensembleSamples > p.maxEnsembleSamples)
    refuse(plan, "maxEnsembleSamples", p.maxEnsembleSamples, ensembleSamples, `The ensemble has ${count(ensembleSamples)} disorder seeds`);
}

/** BullMQ priority of a plan's jobs (lower runs first). */
export function queuePriority(plan: PlanId): number {
  return PLANS[plan].queuePriority;
}

/** The engine's own ensemble (`computation.ensemble.samples`) against the plan's limit. */
export function assertEnsembleWithinPlan(plan: PlanId, input: { computation: unknown }): void {
  const samples = (input.computation as { ensemble?: { samples?: number } })?.ensemble?.samples;
  const max = PLANS[plan].maxEnsembleSamples;
  if (typeof samples === "number" && samples > max) refuse(plan, "maxEnsembleSamples", max, samples, `The ensemble has ${count(samples)} disorder seeds`);
}
