"use client";

import Link from "next/link";
import { useMe } from "@/components/shell/useMe";
import { refusalReason, type Action } from "@/shared/permissions";
import { PLANS, type PlanId } from "@/shared/plans";

/**
 * What the signed-in person may do here, from the permissions table the API enforces
 * (src/shared/permissions.ts): `reason` is the sentence the API would answer a 403 with, shown
 * before any click; null while loading or when allowed.
 */
export function usePermission(action: Action): { allowed: boolean; loading: boolean; reason: string | null } {
  const me = useMe();
  const role = me.data?.role;
  const reason = role ? refusalReason(role, action) : null;
  return { allowed: Boolean(role) && reason === null, loading: me.isPending, reason };
}

/** The reason a control is disabled, in words; link a control to it with aria-describedby={id}. */
export function RefusalNote({ id, reason, testId = "refusal" }: { id?: string; reason: string; testId?: string }) {
  return (
    <p id={id} className="rounded-field border border-line bg-surface-sunk px-3 py-2 text-caption text-fg-soft" data-testid={testId}>
      {reason}
    </p>
  );
}

/**
 * The way to a larger plan from a form that hit a Free-plan limit: the Billing page for those who
 * may change the plan, otherwise who to ask.
 */
export function UpgradeHint({ plan }: { plan: PlanId }) {
  const me = useMe();
  if (plan !== "free") return null;
  const mayUpgrade = me.data ? refusalReason(me.data.role, "billing.manage") === null : false;
  const lab = PLANS.lab;
  return mayUpgrade ? (
    <Link href="/billing" className="font-medium underline" data-testid="upgrade-link">
      upgrade this group to {lab.label} ({lab.seatPriceUsdPerMonth} USD per seat per month, compute metered)
    </Link>
  ) : (
    <span data-testid="upgrade-ask">ask an Owner or Billing admin of this group to upgrade it to {lab.label}</span>
  );
}
