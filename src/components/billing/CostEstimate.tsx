import { formatComputeSeconds } from "@/shared/format";
import { computeCostUsd, PLANS, type PlanId } from "@/shared/plans";

/** Compute-seconds and cost of a job before it is submitted (product: show the cost first). */
export function estimateCost(computeSeconds: number, plan: PlanId): { computeSeconds: number; costUsd: number; note: string } {
  const seconds = Math.max(0, computeSeconds);
  const p = PLANS[plan];
  if (plan === "free") {
    return { computeSeconds: seconds, costUsd: 0, note: `counts against the ${p.includedComputeSeconds / 60} compute-minutes included each month` };
  }
  return { computeSeconds: seconds, costUsd: computeCostUsd(plan, seconds), note: `metered at ${p.computePriceUsdPerHour.toFixed(2)} USD per compute-hour` };
}

export { formatComputeSeconds };

export function formatUsd(usd: number): string {
  if (usd > 0 && usd < 0.01) return "< 0.01 USD";
  return `${usd.toFixed(2)} USD`;
}

/** `<CostEstimate computeSeconds plan />`: the estimate line shown on every run and sweep form. */
export function CostEstimate({ computeSeconds, plan, className = "" }: { computeSeconds: number; plan: PlanId; className?: string }) {
  const e = estimateCost(computeSeconds, plan);
  return (
    <p
      className={`text-caption text-fg-soft ${className}`}
      data-testid="cost-estimate"
      data-compute-seconds={Math.round(e.computeSeconds)}
      data-cost-usd={e.costUsd.toFixed(4)}
    >
      <span className="font-semibold text-fg">Estimate:</span> <span className="tk-num">{formatComputeSeconds(e.computeSeconds)}</span>
      {plan === "free" ? null : (
        <>
          {" · "}
          <span className="tk-num font-semibold text-fg">{formatUsd(e.costUsd)}</span>
        </>
      )}{" "}
      <span className="text-fg-faint">({e.note})</span>
    </p>
  );
}
