import "@/server/server-only";
import { and, eq, sql } from "drizzle-orm";
import { computeCostUsd, PLANS, type PlanId } from "@/shared/plans";
import { getDb } from "@/server/db";
import { usageLedger, workspaces } from "@/server/db/schema";
import { ApiError } from "@/server/http/errors";

/** Billing period of a moment, as stored in the usage ledger: YYYY-MM in UTC. */
export function billingPeriod(at = new Date()): string {
  return at.toISOString().slice(0, 7);
}

export interface BudgetState {
  plan: PlanId;
  planState: "active" | "grace" | "suspended";
  period: string;
  usedComputeSeconds: number;
  includedComputeSeconds: number;
  spendUsd: number;
  spendCapUsd: number | null;
}

/** What a workspace has used this period (from the ledger, the system of record). */
export async function budgetState(workspaceId: string): Promise<BudgetState> {
  const db = getDb();
  const period = billingPeriod();
  const [ws] = await db
    .select({ plan: workspaces.plan, planState: workspaces.planState, cap: workspaces.spendCapUsd })
    .from(workspaces)
    .where(eq(workspaces.id, workspaceId));
  if (!ws) throw new ApiError("not_found", "Workspace not found.");
  const [row] = await db
    .select({ seconds: sql<number>`coalesce(sum(${usageLedger.computeSeconds}), 0)::float8` })
    .from(usageLedger)
    .where(and(eq(usageLedger.workspaceId, workspaceId), eq(usageLedger.period, period)));
  // A workspace in `suspended` state (payment failed past grace) works under Free limits.
  const plan: PlanId = ws.planState === "suspended" ? "free" : ws.plan;
  const used = Number(row?.seconds ?? 0);
  return {
    plan,
    planState: ws.planState,
    period,
    usedComputeSeconds: used,
    includedComputeSeconds: PLANS[plan].includedComputeSeconds,
    spendUsd: computeCostUsd(plan, used),
    spendCapUsd: ws.cap === null ? null : Number(ws.cap),
  };
}

const fmtSeconds = (s: number) => `${Math.round(s).toLocaleString("en-US")} compute-seconds`;
const fmtUsd = (n: number) => `${n.toFixed(2)} USD`;

/**
 * Refuses (402) a job whose estimate would exceed the free quota or the spend cap. Called at
 * submission, after plan limits, before anything is written.
 */
export async function assertWithinBudget(workspaceId: string, estimatedComputeSeconds: number, state?: BudgetState): Promise<BudgetState> {
  const s = state ?? (await budgetState(workspaceId));
  if (s.plan === "free") {
    const left = Math.max(0, s.includedComputeSeconds - s.usedComputeSeconds);
    if (estimatedComputeSeconds > left) {
      throw new ApiError(
        "payment_required",
        `This job is estimated at ${fmtSeconds(estimatedComputeSeconds)}, but only ${fmtSeconds(left)} ` +
          `of the Free plan's ${s.includedComputeSeconds / 60} compute-minutes are left this month (${s.period}). ` +
          `Upgrade to Lab or wait for next month.`,
        { limit: "free_quota", includedComputeSeconds: s.includedComputeSeconds, usedComputeSeconds: s.usedComputeSeconds, estimatedComputeSeconds },
      );
    }
  } else if (s.spendCapUsd !== null) {
    const estimateUsd = computeCostUsd(s.plan, estimatedComputeSeconds);
    if (s.spendUsd + estimateUsd > s.spendCapUsd) {
      throw new ApiError(
        "payment_required",
        `This job's estimated cost (${fmtUsd(estimateUsd)}) ` +
          `would take this month's compute spend from ${fmtUsd(s.spendUsd)} past the spend cap of ${fmtUsd(s.spendCapUsd)}. ` +
          `A Billing admin can raise the cap.`,
        { limit: "spend_cap", spendCapUsd: s.spendCapUsd, spendUsd: s.spendUsd, estimateUsd },
      );
    }
  }
  return s;
}
