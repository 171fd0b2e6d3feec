"use client";

import { PLANS, type PlanId } from "@/shared/plans";
import { CostEstimate, formatComputeSeconds } from "@/components/billing";

/**
 * The estimate before submit: the billing work's <CostEstimate> (compute-seconds and cost on the
 * workspace's plan) plus the number of points for a sweep, and a warning when one job (the run,
 * or the costliest sweep point, `jobSeconds`) is over the plan's per-job cap, which the server refuses.
 */
export function CostLine({ seconds, plan, points = 1, jobSeconds }: { seconds: number | null; plan?: PlanId; points?: number; jobSeconds?: number | null }) {
  if (seconds === null) {
    return (
      <p className="text-caption text-fg-faint" data-testid="estimate">
        The estimate appears once every field is valid.
      </p>
    );
  }
  const p = PLANS[plan ?? "free"];
  const job = jobSeconds ?? (points > 1 ? null : seconds);
  const overCap = job !== null && job > p.maxJobComputeSeconds;
  return (
    <div data-testid="estimate" className="space-y-0.5">
      <CostEstimate computeSeconds={seconds} plan={plan ?? "free"} />
      {overCap ? (
        <p role="alert" className="text-caption text-danger" data-testid="job-cap">
          {points > 1 ? "One point" : "This calculation"} is estimated at {formatComputeSeconds(job)}, over the {p.label} plan&apos;s limit of{" "}
          {formatComputeSeconds(p.maxJobComputeSeconds)} per job; it would be refused.
          {p.id === "free"
            ? ` The ${PLANS.lab.label} plan allows ${formatComputeSeconds(PLANS.lab.maxJobComputeSeconds)}.`
            : " Use a smaller network, fewer samples or fewer energies."}
        </p>
      ) : null}
      <p className="text-micro text-fg-faint">
        {points > 1 ? `For all ${points.toLocaleString("en")} points. ` : ""}
        {p.id === "free" ? `Nothing is charged on ${p.label}.` : "You are charged for the compute-seconds actually used."}
      </p>
    </div>
  );
}
