import "@/server/server-only";
import { sql } from "drizzle-orm";
import { computeCostUsd } from "@/shared/plans";
import { can, requirePermission, type Caller } from "@/server/auth";
import { getDb } from "@/server/db";
import { ApiError } from "@/server/http/errors";
import { billingPeriod, budgetState } from "./budget";
import type { DayUsage, MemberUsage, UsageReport } from "@/shared/api";
export type { DayUsage, MemberUsage, UsageReport };

export function parsePeriod(value: string | null): string {
  if (value === null || value === "") return billingPeriod();
  if (!/^\d{4}-(0[1-9]|1[0-2])$/.test(value)) {
    throw new ApiError("invalid_input", `period: "${value}" is not a billing period; use YYYY-MM (UTC), e.g. ${billingPeriod()}.`, {
      issues: [{ field: "period", message: "must be YYYY-MM" }],
    });
  }
  return value;
}

export async function usageReport(caller: Caller, period = billingPeriod()): Promise<UsageReport> {
  requirePermission(caller, "usage.view");
  // Every member's rows for Owners and Billing admins; others see the group's totals and their own rows only.
  const everyone = can(caller.role, "usage.members");
  const db = getDb();
  const state = await budgetState(caller.workspaceId);
  const members = (await db.execute(sql`
    select m.user_id, coalesce(u.name, '') as name, u.email, m.role::text as role,
      count(l.id)::int as runs, coalesce(sum(l.compute_seconds), 0)::float8 as seconds,
      coalesce(sum(l.compute_seconds) filter (where l.plan = 'lab'), 0)::float8 as lab_seconds
    from memberships m join users u on u.id = m.user_id
    left join usage_ledger l on l.workspace_id = m.workspace_id and l.user_id = m.user_id and l.period = ${period}
    where m.workspace_id = ${caller.workspaceId}
    group by m.user_id, u.name, u.email, m.role
    union all
    select null, 'Former members', null, null, count(l.id)::int, coalesce(sum(l.compute_seconds), 0)::float8,
      coalesce(sum(l.compute_seconds) filter (where l.plan = 'lab'), 0)::float8
    from usage_ledger l
    where l.workspace_id = ${caller.workspaceId} and l.period = ${period}
      and (l.user_id is null or not exists (select 1 from memberships m where m.workspace_id = l.workspace_id and m.user_id = l.user_id))
    having count(l.id) > 0`)) as unknown as {
    user_id: string | null;
    name: string;
    email: string | null;
    role: string | null;
    runs: number;
    seconds: number;
    lab_seconds: number;
  }[];
  const days = (await db.execute(sql`
    select to_char(l.created_at at time zone 'UTC', 'YYYY-MM-DD') as date, l.user_id, sum(l.compute_seconds)::float8 as seconds
    from usage_ledger l where l.workspace_id = ${caller.workspaceId} and l.period = ${period}
    group by 1, 2 order by 1, 2`)) as unknown as { date: string; user_id: string | null; seconds: number }[];
  const memberRows: MemberUsage[] = members
    .filter((m) => everyone || m.user_id === caller.userId)
    .map((m) => ({
      userId: m.user_id,
      name: m.name,
      email: m.email,
      role: m.role,
      runs: Number(m.runs),
      computeSeconds: Number(m.seconds),
      // Cost: what the metered Lab price charges (Free use is within the included minutes).
      costUsd: computeCostUsd("lab", Number(m.lab_seconds)),
    }))
    .sort((a, b) => b.computeSeconds - a.computeSeconds || a.name.localeCompare(b.name));
  const allRows = members.map((m) => ({ seconds: Number(m.seconds), costUsd: computeCostUsd("lab", Number(m.lab_seconds)) }));
  const total = allRows.reduce((a, m) => a + m.seconds, 0);
  return {
    period,
    plan: state.plan,
    computeSeconds: total,
    costUsd: allRows.reduce((a, m) => a + m.costUsd, 0),
    includedComputeSeconds: state.includedComputeSeconds,
    spendCapUsd: state.spendCapUsd,
    membersShown: everyone ? "all" : "own",
    members: memberRows,
    days: days.filter((d) => everyone || d.user_id === caller.userId).map((d) => ({ date: d.date, userId: d.user_id, computeSeconds: Number(d.seconds) })),
  };
}
