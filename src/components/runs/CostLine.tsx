"use client";

import type { PlanId } from "@/config/plans";
import { CostEstimate } from "@/components/billing";

/**
 * The estimate before submit: the billing work's <CostEstimate> (compute-seconds and cost on the
 * workspace's plan) plus the number of points for a sweep.
 */
export function CostLine({ seconds, plan, points = 1 }: { seconds: number | null; plan?: PlanId; points?: number }) {
  if (seconds === null) {
    return (
      <p className="text-caption text-fg-faint" data-testid="estimate">
        The estimate appears once every field is valid.
      </p>
    );
  }
  return (
    <div data-testid="estimate" className="space-y-0.5">
      <CostEstimate computeSeconds={seconds} plan={plan ?? "free"} />
      <p className="text-micro text-fg-faint">
        {points > 1 ? `For all ${points.toLocaleString("en")} points. ` : ""}You are charged for the compute-seconds actually used.
      </p>
    </div>
  );
}
