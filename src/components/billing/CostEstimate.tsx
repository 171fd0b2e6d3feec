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

export function formatComputeSeconds(seconds: number): string {
  if (seconds < 1) return `${seconds.toFixed(2)} compute-seconds`;
  if (seconds < 120) return `${seconds.toFixed(seconds < 10 ? 1 : 0)} compute-seconds`;
  if (seconds < 7200) return `${(seconds / 60).toFixed(1)} compute-minutes`;
  return `${(seconds / 3600).toFixed(2)} compute-hours`;
}

export function formatUsd(usd: number): string {
  if (usd > 0 && usd < 0.01) return "< 0.01 USD";
  return `${usd.toFixed(2)} USD`;
}

/** `<CostEstimate computeSeconds plan />`: the estimate line shown on every run and sweep form. */
export function CostEstimate({ computeSeconds, plan, className = "" }: { computeSeconds: number; plan: PlanId; className?: string }) {
  const e = estimateCost(computeSeconds, plan);
  return (
    <p className={`text-caption text-fg-soft ${className}`} data-testid="cost-estimate" data-compute-seconds={Math.round(e.computeSeconds)} data-cost-usd={e.costUsd.toFixed(4)}>
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
