import "@/server/server-only";
import { sql } from "drizzle-orm";
import Stripe from "stripe";
import { env } from "@/env";
import { getDb } from "@/server/db";
import { backoffMs, METER_SENDER, STRIPE_OBJECTS } from "./config";
import { getStripe } from "./stripe";

/**
 * The meter-event sender. The usage ledger is the system of record; every Lab ledger row gets one
 * outbox row (status pending), and this sender turns it into one Stripe meter event whose
 * `identifier` is the ledger row id. The same identifier and an idempotency key derived from it
 * make every retry harmless: a sender killed midway, or two senders at once, never lose or
 * double-count usage. Temporary failures (Stripe unreachable, 5xx, 429) stay pending with a
 * backoff; events Stripe refuses for good become `failed` with its reason.
 */

export interface SendReport {
  queued: number;
  claimed: number;
  sent: number;
  alreadyRecorded: number;
  retrying: number;
  failed: number;
}

/** Meter values are strings; keep three decimals of compute-seconds, without trailing zeros. */
export function meterValue(computeSeconds: number): string {
  if (!Number.isFinite(computeSeconds) || computeSeconds <= 0) return "0";
  const fixed = computeSeconds.toFixed(3);
  return fixed.includes(".") ? fixed.replace(/0+$/, "").replace(/\.$/, "") : fixed;
}

export type Outcome = { kind: "sent" } | { kind: "already" } | { kind: "retry"; error: string } | { kind: "failed"; reason: string };

/** How a Stripe error bears on one meter event (pure, tested). */
export function classifyStripeError(err: unknown): Outcome {
  if (err instanceof Stripe.errors.StripeError) {
    if (err.code === "resource_already_exists" && (err.param === "identifier" || /identifier/i.test(err.message))) return { kind: "already" };
    if (err.type === "StripeConnectionError" || err.type === "StripeAPIError" || err.type === "StripeRateLimitError" || (err.statusCode ?? 0) >= 500) {
      return { kind: "retry", error: `${err.type}: ${err.message}` };
    }
    if (err.type === "StripeAuthenticationError" || err.type === "StripePermissionError") {
      // A configuration problem on our side: keep the usage and try again later.
      return { kind: "retry", error: `${err.type}: ${err.message}` };
    }
    return { kind: "failed", reason: `Stripe refused the meter event (${err.code ?? err.type}${err.param ? `, ${err.param}` : ""}): ${err.message}` };
  }
  return { kind: "retry", error: (err as Error)?.message ?? String(err) };
}

/** Creates the outbox rows of Lab ledger rows that have none yet (idempotent). */
export async function queueLedgerRows(): Promise<number> {
  const db = getDb();
  const rows = await db.execute(sql`
    insert into meter_outbox (ledger_id, workspace_id, compute_seconds, usage_at)
    select l.id, l.workspace_id, l.compute_seconds, l.created_at
    from usage_ledger l
    where l.plan = 'lab'
      -- Stripe takes meter events of the past 35 days only; older rows were queued long ago.
      and l.created_at > now() - interval '35 days'
      and not exists (select 1 from meter_outbox o where o.ledger_id = l.id)
    order by l.created_at
    limit 5000
    on conflict (ledger_id) do nothing
    returning id`);
  return rows.length;
}

interface Claimed {
  id: string;
  ledger_id: string;
  workspace_id: string;
  compute_seconds: number;
  usage_at: Date | string;
  attempts: number;
  stripe_customer_id: string | null;
}

/** Claims due pending rows for this sender (a lease: a killed sender's rows come back when it ends). */
async function claim(batchSize: number, leaseSeconds: number, workspaceId?: string): Promise<Claimed[]> {
  const db = getDb();
  const rows = await db.execute(sql`
    update meter_outbox o set lease_until = now() + make_interval(secs => ${leaseSeconds}), attempts = o.attempts + 1
    from workspaces w
    where w.id = o.workspace_id and o.id in (
      select id from meter_outbox
      where status = 'pending' and next_attempt_at <= now() and (lease_until is null or lease_until < now())
        ${workspaceId ? sql`and workspace_id = ${workspaceId}` : sql``}
      order by created_at
      limit ${batchSize}
      for update skip locked)
    returning o.id, o.ledger_id, o.workspace_id, o.compute_seconds, o.usage_at, o.attempts, w.stripe_customer_id`);
  return rows as unknown as Claimed[];
}

async function settle(row: Claimed, outcome: Outcome, customer: string | null): Promise<void> {
  const db = getDb();
  switch (outcome.kind) {
    case "sent":
    case "already":
      await db.execute(sql`update meter_outbox set status = 'sent', sent_at = now(), lease_until = null, stripe_customer_id = ${customer},
        last_error = ${outcome.kind === "already" ? "Stripe already had this event (same identifier); counted once." : null} where id = ${row.id}`);
      return;
    case "retry": {
      const delay = backoffMs(row.attempts);
      await db.execute(sql`update meter_outbox set lease_until = null, last_error = ${outcome.error.slice(0, 500)},
        next_attempt_at = now() + make_interval(secs => ${delay / 1000}) where id = ${row.id} and status = 'pending'`);
      return;
    }
    case "failed":
      await db.execute(
        sql`update meter_outbox set status = 'failed', lease_until = null, last_error = ${outcome.reason.slice(0, 1000)},
          stripe_customer_id = ${customer} where id = ${row.id}`,
      );
  }
}

export interface SenderOptions {
  batchSize?: number;
  leaseSeconds?: number;
  /** Only this workspace's rows (tests). */
  workspaceId?: string;
  /** Stop after this many events (tests). */
  maxEvents?: number;
}

/** One pass: queue new ledger rows, then send every due row (batch after batch). */
export async function sendDueMeterEvents(opts: SenderOptions = {}): Promise<SendReport> {
  const report: SendReport = { queued: await queueLedgerRows(), claimed: 0, sent: 0, alreadyRecorded: 0, retrying: 0, failed: 0 };
  const stripe = getStripe();
  const batchSize = opts.batchSize ?? METER_SENDER.batchSize;
  for (;;) {
    const batch = await claim(batchSize, opts.leaseSeconds ?? env().METER_SENDER_LEASE_SECONDS, opts.workspaceId);
    if (batch.length === 0) break;
    report.claimed += batch.length;
    let stripeDown = false;
    for (const row of batch) {
      const customer = row.stripe_customer_id;
      let outcome: Outcome;
      if (stripeDown) outcome = { kind: "retry", error: "Stripe was unreachable for an earlier event of this batch" };
      else if (!customer)
        outcome = { kind: "failed", reason: "The workspace has no Stripe customer (it was not subscribed through Stripe), so this usage cannot be metered." };
      else {
        try {
          await stripe.billing.meterEvents.create(
            {
              event_name: STRIPE_OBJECTS.meterEventName,
              identifier: row.ledger_id,
              timestamp: Math.floor(new Date(row.usage_at).getTime() / 1000),
              payload: { stripe_customer_id: customer, value: meterValue(Number(row.compute_seconds)) },
            },
            { idempotencyKey: `triskel-meter-${row.ledger_id}` },
          );
          outcome = { kind: "sent" };
        } catch (err) {
          outcome = classifyStripeError(err);
          if (outcome.kind === "retry") stripeDown = true;
        }
      }
      await settle(row, outcome, customer);
      if (outcome.kind === "sent") report.sent++;
      else if (outcome.kind === "already") report.alreadyRecorded++;
      else if (outcome.kind === "retry") report.retrying++;
      else report.failed++;
      if (opts.maxEvents !== undefined && report.claimed >= opts.maxEvents) return report;
    }
    if (stripeDown) break;
  }
  return report;
}

/** Counts of a workspace's outbox, for the Billing page. */
export async function outboxSummary(workspaceId: string): Promise<{ pending: number; sent: number; failed: number; lastError: string | null }> {
  const db = getDb();
  const rows = (await db.execute(sql`select status, count(*)::int as n from meter_outbox where workspace_id = ${workspaceId} group by status`)) as unknown as {
    status: string;
    n: number;
  }[];
  const [last] = (await db.execute(
    sql`select last_error from meter_outbox where workspace_id = ${workspaceId} and last_error is not null and status <> 'sent'
      order by created_at desc limit 1`,
  )) as unknown as { last_error: string }[];
  const by = Object.fromEntries(rows.map((r) => [r.status, r.n]));
  return { pending: by.pending ?? 0, sent: by.sent ?? 0, failed: by.failed ?? 0, lastError: last?.last_error ?? null };
}
