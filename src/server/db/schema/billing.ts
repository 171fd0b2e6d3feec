import "../../server-only";
import { index, integer, jsonb, pgEnum, pgTable, real, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { workspaces } from "./accounts";
import { usageLedger } from "./compute";

/** State of one meter event on its way to Stripe. */
export const meterOutboxStatus = pgEnum("meter_outbox_status", ["pending", "sent", "failed"]);

/**
 * Outbox of meter events: one row per usage-ledger row of a Lab workspace. The sender claims
 * pending rows (with a lease, so a killed sender's rows come back), sends them with
 * `identifier` = ledger row id, and marks them sent, or failed with a reason when Stripe refuses
 * them for good. Temporary failures stay pending with a later `next_attempt_at`.
 */
export const meterOutbox = pgTable(
  "meter_outbox",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    ledgerId: uuid("ledger_id")
      .notNull()
      .unique()
      .references(() => usageLedger.id, { onDelete: "cascade" }),
    workspaceId: uuid("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    computeSeconds: real("compute_seconds").notNull(),
    /** When the usage happened (the ledger row's time): the meter event's timestamp. */
    usageAt: timestamp("usage_at", { withTimezone: true }).notNull(),
    status: meterOutboxStatus("status").notNull().default("pending"),
    attempts: integer("attempts").notNull().default(0),
    nextAttemptAt: timestamp("next_attempt_at", { withTimezone: true }).notNull().defaultNow(),
    leaseUntil: timestamp("lease_until", { withTimezone: true }),
    /** Last temporary error (pending) or the reason Stripe refused the event (failed). */
    lastError: text("last_error"),
    stripeCustomerId: text("stripe_customer_id"),
    sentAt: timestamp("sent_at", { withTimezone: true }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("meter_outbox_due").on(t.status, t.nextAttemptAt), index("meter_outbox_workspace").on(t.workspaceId, t.status)],
);

/** Stripe webhook events, stored once (the event id is the key) and applied in the same transaction. */
export const stripeEvents = pgTable(
  "stripe_events",
  {
    id: text("id").primaryKey(),
    type: text("type").notNull(),
    /** Stripe's `created` of the event. */
    stripeCreatedAt: timestamp("stripe_created_at", { withTimezone: true }).notNull(),
    workspaceId: uuid("workspace_id").references(() => workspaces.id, { onDelete: "set null" }),
    /** What applying it did (for the Billing page and for support). */
    outcome: text("outcome").notNull(),
    payload: jsonb("payload").notNull(),
    receivedAt: timestamp("received_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("stripe_events_workspace").on(t.workspaceId, t.receivedAt)],
);

/** Billing facts of a workspace that Stripe does not keep for us: the grace period after a failed payment. */
export const workspaceBilling = pgTable("workspace_billing", {
  workspaceId: uuid("workspace_id")
    .primaryKey()
    .references(() => workspaces.id, { onDelete: "cascade" }),
  /** Set when a payment fails; past it, the workspace works under Free limits until paid. */
  graceEndsAt: timestamp("grace_ends_at", { withTimezone: true }),
  lastPaymentFailedAt: timestamp("last_payment_failed_at", { withTimezone: true }),
  lastInvoicePaidAt: timestamp("last_invoice_paid_at", { withTimezone: true }),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

/** Spend-cap e-mails sent (at most one per workspace, period and threshold). */
export const spendCapNotices = pgTable(
  "spend_cap_notices",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    workspaceId: uuid("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    /** Billing period YYYY-MM (UTC). */
    period: text("period").notNull(),
    thresholdPercent: integer("threshold_percent").notNull(),
    spendUsd: real("spend_usd").notNull(),
    spendCapUsd: real("spend_cap_usd").notNull(),
    recipients: jsonb("recipients").notNull(),
    sentAt: timestamp("sent_at", { withTimezone: true }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("spend_cap_notices_once").on(t.workspaceId, t.period, t.thresholdPercent)],
);
