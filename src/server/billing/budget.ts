import "@/server/server-only";
import { sql } from "drizzle-orm";
import { computeCostUsd, effectivePlan, PLANS, type PlanId, type PlanState } from "@/shared/plans";
import { getDb, type Executor, type Tx } from "@/server/db";
import { ApiError } from "@/server/http/errors";

/** Billing period of a moment, as stored in the usage ledger: YYYY-MM in UTC. */
export function billingPeriod(at = new Date()): string {
  return at.toISOString().slice(0, 7);
}

export interface BudgetState {
  /** The plan whose quota and price apply now (effectivePlan). */
  plan: PlanId;
  planState: PlanState;
  period: string;
  /** Finished compute this period, from the usage ledger. */
  usedComputeSeconds: number;
  /** Held by work not finished yet: the estimates of queued and running calculations (scan points included) and fits. */
  reservedComputeSeconds: number;
  includedComputeSeconds: number;
  /** Spend of the finished compute. */
  spendUsd: number;
  /** Spend the reserved compute would add. */
  reservedUsd: number;
  spendCapUsd: number | null;
}

/**
 * What a workspace has used this period (the ledger, the system of record) and what its unfinished
 * work holds, read in one statement so a job finishing meanwhile is counted once, as used or as
 * reserved. Inside a transaction that holds the workspace's lock (reserveBudget), no submission
 * can slip in between the reading and the writing.
 */
export async function budgetState(workspaceId: string, db: Executor = getDb()): Promise<BudgetState> {
  const period = billingPeriod();
  const [row] = await db.execute<{ plan: PlanId; plan_state: PlanState; cap: string | null; used: number; reserved: number }>(sql`
    select w.plan, w.plan_state, w.spend_cap_usd as cap,
      (select coalesce(sum(l.compute_seconds), 0)::float8 from usage_ledger l
        where l.workspace_id = w.id and l.period = ${period}) as used,
      (select coalesce(sum(r.estimated_compute_seconds), 0)::float8 from runs r
        where r.workspace_id = w.id and r.status in ('queued', 'running') and r.kind <> 'fit')
        + (select coalesce(sum(f.estimated_compute_seconds), 0)::float8 from fits f
          where f.workspace_id = w.id and f.status in ('queued', 'running')) as reserved
    from workspaces w where w.id = ${workspaceId}`);
  if (!row) throw new ApiError("not_found", "Group not found.");
  const plan = effectivePlan(row.plan, row.plan_state);
  const used = Number(row.used);
  const reserved = Number(row.reserved);
  return {
    plan,
    planState: row.plan_state,
    period,
    usedComputeSeconds: used,
    reservedComputeSeconds: reserved,
    includedComputeSeconds: PLANS[plan].includedComputeSeconds,
    spendUsd: computeCostUsd(plan, used),
    reservedUsd: computeCostUsd(plan, reserved),
    spendCapUsd: row.cap === null ? null : Number(row.cap),
  };
}

/**
 * Step 2 of the job pipeline, inside the transaction that writes the job's rows: locks the
 * workspace's row (concurrent submissions of one workspace queue here), then refuses (402) a job
 * whose estimate does not fit beside the finished and the reserved compute. The rows the
 * transaction then writes as queued are the reservation; finishing replaces it by the ledger row,
 * cancelling and failing release it (both in the same transaction as the status change).
 */
export async function reserveBudget(tx: Tx, workspaceId: string, estimatedComputeSeconds: number): Promise<BudgetState> {
  await tx.execute(sql`select id from workspaces where id = ${workspaceId} for update`);
  return assertWithinBudget(workspaceId, estimatedComputeSeconds, await budgetState(workspaceId, tx));
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
    const left = Math.max(0, s.includedComputeSeconds - s.usedComputeSeconds - s.reservedComputeSeconds);
    if (estimatedComputeSeconds > left) {
      const held =
        s.reservedComputeSeconds > 0 ? ` (${fmtSeconds(s.reservedComputeSeconds)} of them are held by queued and running work until it finishes)` : "";
      throw new ApiError(
        "payment_required",
        `This job is estimated at ${fmtSeconds(estimatedComputeSeconds)}, but only ${fmtSeconds(left)} ` +
          `of the Free plan's ${s.includedComputeSeconds / 60} compute-minutes are left this month (${s.period})${held}. ` +
          `Upgrade to Lab or wait for next month.`,
        {
          limit: "free_quota",
          includedComputeSeconds: s.includedComputeSeconds,
          usedComputeSeconds: s.usedComputeSeconds,
          reservedComputeSeconds: s.reservedComputeSeconds,
          estimatedComputeSeconds,
        },
      );
    }
  } else if (s.spendCapUsd !== null) {
    const estimateUsd = computeCostUsd(s.plan, estimatedComputeSeconds);
    if (s.spendUsd + s.reservedUsd + estimateUsd > s.spendCapUsd) {
      const held = s.reservedUsd > 0 ? ` (${fmtUsd(s.spendUsd)} spent and ${fmtUsd(s.reservedUsd)} held by queued and running work)` : "";
      throw new ApiError(
        "payment_required",
        `This job's estimated cost (${fmtUsd(estimateUsd)}) ` +
          `would take this month's compute spend from ${fmtUsd(s.spendUsd + s.reservedUsd)}${held} past the spend cap of ${fmtUsd(s.spendCapUsd)}. ` +
          `A Billing admin can raise the cap.`,
        { limit: "spend_cap", spendCapUsd: s.spendCapUsd, spendUsd: s.spendUsd, reservedUsd: s.reservedUsd, estimateUsd },
      );
    }
  }
  return s;
}
