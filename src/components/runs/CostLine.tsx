"use client";

import { computeCostUsd, PLANS, type PlanId } from "@/config/plans";
import { computeSeconds as fmtSeconds } from "@/lib/units";

/** Estimated compute-seconds and what they cost on the workspace's plan, shown before submit. */
export function CostLine({ seconds, plan, points = 1 }: { seconds: number | null; plan?: PlanId; points?: number }) {
  const p = plan ?? "free";
  if (seconds === null) return <p className="text-caption text-fg-faint" data-testid="estimate">Estimate appears once the inputs are valid.</p>;
  const usd = computeCostUsd(p, seconds);
  return (
    <p className="text-body" data-testid="estimate">
      Estimated <strong className="tk-num">{fmtSeconds(seconds)}</strong>
      {points > 1 ? <span className="text-fg-faint"> for {points.toLocaleString("en")} points</span> : null}
      {" · "}
      {p === "free" ? (
        <span className="text-fg-soft">counts against the Free plan&apos;s {PLANS.free.includedComputeSeconds / 60} included compute-minutes this month</span>
      ) : (
        <span className="tk-num text-fg-soft">≈ {usd < 0.01 ? "< 0.01" : usd.toFixed(2)} USD at {PLANS.lab.computePriceUsdPerHour.toFixed(2)} USD per compute-hour</span>
      )}
      . You are charged the compute-seconds actually used.
    </p>
  );
}
