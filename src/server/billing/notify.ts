import "@/server/server-only";
import { sql } from "drizzle-orm";
import { computeCostUsd } from "@/shared/plans";
import { env } from "@/env";
import { getDb } from "@/server/db";
import { sendMail } from "@/server/mail";
import { billingPeriod } from "./budget";
import { BILLING_RULES } from "./config";

/**
 * Spend-cap e-mails: when a Lab workspace's compute spend this period reaches 80 % and then
 * 100 % of its cap, the Owner and the Billing admins get one e-mail each time (recorded in
 * spend_cap_notices, so never twice for the same period and threshold).
 * Mail goes through the app's one mail transport (src/server/mail: SMTP_URL, MAIL_FROM).
 */

const fmtUsd = (n: number) => `${n.toFixed(2)} USD`;

/** Subject and text of a spend-cap notice (pure, tested). */
export function spendCapMessage(input: {
  workspaceName: string;
  period: string;
  thresholdPercent: number;
  spendUsd: number;
  spendCapUsd: number;
  billingUrl: string;
}) {
  const reached = input.thresholdPercent >= 100;
  const subject = reached
    ? `${input.workspaceName}: compute spend reached the spend cap (${fmtUsd(input.spendCapUsd)})`
    : `${input.workspaceName}: compute spend at ${input.thresholdPercent} % of the spend cap`;
  const text = [
    `Compute spend of ${input.workspaceName} for ${input.period}: ${fmtUsd(input.spendUsd)} of the ${fmtUsd(input.spendCapUsd)} ` +
      `spend cap (${Math.floor((input.spendUsd / input.spendCapUsd) * 100)} %).`,
    reached
      ? "New runs and sweeps whose estimate would exceed the cap are refused until next month or until a Billing admin raises the cap."
      : "When the cap is reached, new runs and sweeps whose estimate would exceed it are refused.",
    `Review usage per member or change the cap: ${input.billingUrl}`,
    "",
    "You receive this as an Owner or Billing admin of the group.",
  ].join("\n");
  return { subject, text };
}

interface CapRow {
  workspace_id: string;
  name: string;
  spend_cap_usd: string;
  used_seconds: number;
}

/** Checks every capped Lab workspace this period and sends the notices due. Returns how many were sent. */
export async function sendSpendCapNotices(now = new Date()): Promise<number> {
  const db = getDb();
  const period = billingPeriod(now);
  const rows = (await db.execute(sql`
    select w.id as workspace_id, w.name, w.spend_cap_usd, coalesce(sum(l.compute_seconds), 0)::float8 as used_seconds
    from workspaces w join usage_ledger l on l.workspace_id = w.id and l.period = ${period}
    where w.plan = 'lab' and w.plan_state <> 'suspended' and w.spend_cap_usd is not null and w.spend_cap_usd > 0
    group by w.id`)) as unknown as CapRow[];
  let sent = 0;
  for (const r of rows) {
    const cap = Number(r.spend_cap_usd);
    const spend = computeCostUsd("lab", Number(r.used_seconds));
    for (const fraction of BILLING_RULES.spendCapNoticeFractions) {
      if (spend < cap * fraction) continue;
      const percent = Math.round(fraction * 100);
      const recipients = (await db.execute(sql`
        select u.email from memberships m join users u on u.id = m.user_id
        where m.workspace_id = ${r.workspace_id} and m.role in ('owner', 'billing_admin') order by u.email`)) as unknown as { email: string }[];
      const emails = recipients.map((x) => x.email);
      const inserted = (await db.execute(sql`
        insert into spend_cap_notices (workspace_id, period, threshold_percent, spend_usd, spend_cap_usd, recipients)
        values (${r.workspace_id}, ${period}, ${percent}, ${spend}, ${cap}, ${JSON.stringify(emails)}::jsonb)
        on conflict (workspace_id, period, threshold_percent) do nothing returning id`)) as unknown as { id: string }[];
      if (inserted.length === 0) continue;
      if (emails.length === 0) continue;
      const { subject, text } = spendCapMessage({
        workspaceName: r.name,
        period,
        thresholdPercent: percent,
        spendUsd: spend,
        spendCapUsd: cap,
        billingUrl: `${env().APP_URL}/billing`,
      });
      try {
        await sendMail({ to: emails, subject, text });
        await db.execute(sql`update spend_cap_notices set sent_at = now() where id = ${inserted[0].id}`);
        sent++;
      } catch (err) {
        // Not sent: forget the notice so the next pass tries again.
        await db.execute(sql`delete from spend_cap_notices where id = ${inserted[0].id}`);
        console.error(`[billing] spend-cap e-mail for workspace ${r.workspace_id} not sent: ${(err as Error).message}`);
      }
    }
  }
  return sent;
}
