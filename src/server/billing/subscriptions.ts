import "@/server/server-only";
import { count, eq, sql } from "drizzle-orm";
import { PLANS } from "@/shared/plans";
import { env } from "@/env";
import { requirePermission, type Caller } from "@/server/auth";
import { getDb, type Executor } from "@/server/db";
import { seatUse } from "@/server/workspaces/members";
import { memberships, workspaceBilling, workspaces } from "@/server/db/schema";
import { ApiError } from "@/server/http/errors";
import { budgetState } from "./budget";
import { outboxSummary } from "./meter-sender";
import { getStripe, stripePrices, stripeToApiError } from "./stripe";
import { seatQuantity } from "./webhooks";
import type { BillingOverview, CheckoutStart, InvoiceList, InvoiceView, SeatsView, SeatUse } from "@/shared/api";
export type { CheckoutStart, InvoiceView };

/**
 * Plan, seats, spend cap and invoices of the caller's workspace. Stripe is the payment system;
 * the workspace row mirrors what its webhooks said (plan, state, seats).
 */

async function workspaceOf(workspaceId: string, db: Executor = getDb()) {
  const [ws] = await db.select().from(workspaces).where(eq(workspaces.id, workspaceId));
  if (!ws) throw new ApiError("not_found", "Group not found.");
  return ws;
}

export async function memberCount(workspaceId: string): Promise<number> {
  const [row] = await getDb().select({ n: count() }).from(memberships).where(eq(memberships.workspaceId, workspaceId));
  return Number(row?.n ?? 0);
}

/** The workspace's Stripe customer, created once (idempotency key per workspace). */
async function ensureCustomer(ws: typeof workspaces.$inferSelect): Promise<string> {
  if (ws.stripeCustomerId) return ws.stripeCustomerId;
  const stripe = getStripe();
  let customerId: string;
  try {
    const c = await stripe.customers.create(
      { name: ws.name, metadata: { workspace_id: ws.id, workspace_slug: ws.slug } },
      { idempotencyKey: `triskel-customer-${ws.id}` },
    );
    customerId = c.id;
  } catch (err) {
    throw stripeToApiError(err, "create the payment customer");
  }
  const db = getDb();
  await db
    .update(workspaces)
    .set({ stripeCustomerId: customerId, updatedAt: new Date() })
    .where(sql`${workspaces.id} = ${ws.id} and ${workspaces.stripeCustomerId} is null`);
  const [back] = await db.select({ id: workspaces.stripeCustomerId }).from(workspaces).where(eq(workspaces.id, ws.id));
  return back?.id ?? customerId;
}

/** Upgrade to Lab: a Checkout Session with one seat per current member, plus metered compute. */
export async function startCheckout(caller: Caller): Promise<CheckoutStart> {
  requirePermission(caller, "billing.manage");
  const ws = await workspaceOf(caller.workspaceId);
  if (ws.plan === "lab" && ws.stripeSubscriptionId)
    throw new ApiError("conflict", "This group is already on the Lab plan; change seats or payment details instead.");
  const seats = Math.max(1, await memberCount(ws.id));
  const customer = await ensureCustomer(ws);
  try {
    const prices = await stripePrices();
    const base = env().APP_URL;
    const session = await getStripe().checkout.sessions.create({
      mode: "subscription",
      customer,
      client_reference_id: ws.id,
      line_items: [{ price: prices.seatPriceId, quantity: seats }, { price: prices.computePriceId }],
      subscription_data: { metadata: { workspace_id: ws.id } },
      metadata: { workspace_id: ws.id },
      success_url: `${base}/billing?checkout=success&session_id={CHECKOUT_SESSION_ID}`,
      cancel_url: `${base}/billing?checkout=cancelled`,
    });
    if (!session.url) throw new ApiError("internal", "Stripe returned a Checkout Session without a URL.");
    return { url: session.url, sessionId: session.id, seats };
  } catch (err) {
    throw stripeToApiError(err, "start the checkout");
  }
}

/** The customer portal (payment details, invoices, cancellation) for a Lab workspace. */
export async function openPortal(caller: Caller): Promise<{ url: string }> {
  requirePermission(caller, "billing.manage");
  const ws = await workspaceOf(caller.workspaceId);
  if (!ws.stripeCustomerId) throw new ApiError("conflict", "This group has no payment account yet: upgrade to Lab first.");
  try {
    const s = await getStripe().billingPortal.sessions.create({ customer: ws.stripeCustomerId, return_url: `${env().APP_URL}/billing` });
    return { url: s.url };
  } catch (err) {
    throw stripeToApiError(err, "open the billing portal");
  }
}

/** The seat quantity of the Lab subscription in Stripe set to `seats` (Stripe prorates); the row mirrors Stripe's answer. */
async function applySeats(db: Executor, ws: typeof workspaces.$inferSelect, seats: number): Promise<number> {
  if (!ws.stripeSubscriptionId) throw new ApiError("conflict", "This group has no Lab subscription; seats are bought with the upgrade to Lab.");
  const stripe = getStripe();
  try {
    const sub = await stripe.subscriptions.retrieve(ws.stripeSubscriptionId);
    if (sub.status === "canceled") throw new ApiError("conflict", "The Lab subscription has ended; upgrade again to buy seats.");
    const prices = await stripePrices();
    const item = sub.items.data.find((i) => i.price.id === prices.seatPriceId) ?? sub.items.data.find((i) => i.price.recurring?.usage_type !== "metered");
    if (!item) throw new ApiError("internal", "The Lab subscription has no seat item.");
    if (item.quantity !== seats) {
      const updated = await stripe.subscriptions.update(
        sub.id,
        { items: [{ id: item.id, quantity: seats }], proration_behavior: "create_prorations" },
        { idempotencyKey: `triskel-seats-${ws.id}-${item.quantity ?? 0}-to-${seats}-${Date.now()}` },
      );
      seats = seatQuantity(updated);
    }
  } catch (err) {
    throw stripeToApiError(err, "change the number of seats");
  }
  await db.update(workspaces).set({ seats, updatedAt: new Date() }).where(eq(workspaces.id, ws.id));
  return seats;
}

/** The seats of a Lab workspace as a Billing admin sees them: bought, taken, the least it may have and what they cost. */
function seatsView(seats: number, use: SeatUse): SeatsView {
  const price = PLANS.lab.seatPriceUsdPerMonth;
  return {
    seats,
    members: use.members,
    pending: use.pending,
    minimumSeats: Math.max(1, use.members + use.pending),
    maxSeats: PLANS.lab.maxSeats,
    seatPriceUsdPerMonth: price,
    monthlySeatsUsd: Math.round(seats * price * 100) / 100,
  };
}

/** GET /api/v1/billing/seats. */
export async function getSeats(caller: Caller): Promise<SeatsView> {
  requirePermission(caller, "seats.manage");
  const use = await seatUse(caller.workspaceId);
  return seatsView(use.seats, use);
}

function requireSubscription(ws: typeof workspaces.$inferSelect) {
  if (ws.plan !== "lab" || !ws.stripeSubscriptionId)
    throw new ApiError("conflict", "This group has no Lab subscription; seats are bought with the upgrade to Lab.");
}

/**
 * PUT /api/v1/billing/seats: an Owner or Billing admin buys or gives back seats. Every member and
 * every open invitation needs a seat, so the count cannot go below members + open invitations.
 * The workspace row stays locked until Stripe has answered, so no invitation takes a seat meanwhile.
 */
export async function setSeats(caller: Caller, seats: number): Promise<SeatsView> {
  requirePermission(caller, "seats.manage");
  return getDb().transaction(async (tx) => {
    const use = await seatUse(caller.workspaceId, tx, { lock: true });
    requireSubscription(await workspaceOf(caller.workspaceId, tx));
    const view = seatsView(use.seats, use);
    if (seats < view.minimumSeats)
      throw new ApiError(
        "conflict",
        `${seats} seat${seats === 1 ? "" : "s"} would not cover ${use.members} member${use.members === 1 ? "" : "s"} and ${use.pending} open ` +
          `invitation${use.pending === 1 ? "" : "s"}: the least is ${view.minimumSeats}. Remove a member or revoke an invitation first.`,
        { field: "seats", minimumSeats: view.minimumSeats, members: use.members, pending: use.pending },
      );
    const ws = await workspaceOf(caller.workspaceId, tx);
    const now = await applySeats(tx, ws, seats);
    return seatsView(now, use);
  });
}

/** POST /api/v1/billing/seats/sync: seats set to what is taken now (members and open invitations, at least 1). */
export async function syncSeats(caller: Caller): Promise<{ seats: number; members: number }> {
  requirePermission(caller, "seats.manage");
  return getDb().transaction(async (tx) => {
    const use = await seatUse(caller.workspaceId, tx, { lock: true });
    const ws = await workspaceOf(caller.workspaceId, tx);
    requireSubscription(ws);
    const seats = await applySeats(tx, ws, Math.max(1, use.members + use.pending));
    return { seats, members: use.members };
  });
}

/**
 * Worker pass: a Lab subscription with fewer seats than members (members added outside the
 * invitation flow, e.g. by an operator) gets one seat per member. Seats are never lowered here:
 * giving seats back is the Billing admin's choice.
 */
export async function reconcileSeats(): Promise<number> {
  const rows = (await getDb().execute(sql`
    select w.id from workspaces w
    where w.plan = 'lab' and w.stripe_subscription_id is not null and w.plan_state <> 'suspended'
      and w.seats < (select count(*) from memberships m where m.workspace_id = w.id)`)) as unknown as { id: string }[];
  let changed = 0;
  for (const r of rows) {
    try {
      await getDb().transaction(async (tx) => {
        const use = await seatUse(r.id, tx, { lock: true });
        if (use.seats < use.members) await applySeats(tx, await workspaceOf(r.id, tx), use.members);
      });
      changed++;
    } catch (err) {
      console.error(`[billing] seats of workspace ${r.id} not raised to its members: ${(err as Error).message}`);
    }
  }
  return changed;
}

export async function setSpendCap(caller: Caller, spendCapUsd: number | null): Promise<{ spendCapUsd: number | null }> {
  requirePermission(caller, "billing.manage");
  await getDb()
    .update(workspaces)
    .set({ spendCapUsd: spendCapUsd === null ? null : spendCapUsd.toFixed(2), updatedAt: new Date() })
    .where(eq(workspaces.id, caller.workspaceId));
  return { spendCapUsd };
}

const invoiceView = (i: {
  id?: string;
  number: string | null;
  status: string | null;
  total: number;
  amount_due: number;
  currency: string;
  period_start: number;
  period_end: number;
  created: number;
  hosted_invoice_url?: string | null;
}): InvoiceView => ({
  id: i.id ?? "upcoming",
  number: i.number,
  status: i.status,
  totalUsd: i.total / 100,
  amountDueUsd: i.amount_due / 100,
  currency: i.currency,
  periodStart: new Date(i.period_start * 1000).toISOString(),
  periodEnd: new Date(i.period_end * 1000).toISOString(),
  createdAt: new Date(i.created * 1000).toISOString(),
  url: i.hosted_invoice_url ?? null,
});

/** Invoices from Stripe, newest first, and the preview of the next one. */
export async function listInvoices(caller: Caller): Promise<InvoiceList> {
  requirePermission(caller, "billing.manage");
  const ws = await workspaceOf(caller.workspaceId);
  if (!ws.stripeCustomerId) return { invoices: [], upcoming: null };
  const stripe = getStripe();
  try {
    const list = await stripe.invoices.list({ customer: ws.stripeCustomerId, limit: 24 });
    let upcoming: InvoiceView | null = null;
    if (ws.stripeSubscriptionId && ws.plan === "lab") {
      const preview = await stripe.invoices.createPreview({ customer: ws.stripeCustomerId, subscription: ws.stripeSubscriptionId });
      upcoming = invoiceView(preview);
    }
    return { invoices: list.data.map(invoiceView), upcoming };
  } catch (err) {
    throw stripeToApiError(err, "read the invoices");
  }
}

/** Everything the Billing page shows at the top. */
export async function billingOverview(caller: Caller): Promise<BillingOverview> {
  requirePermission(caller, "usage.view");
  const ws = await workspaceOf(caller.workspaceId);
  const [budget, members, outbox, grace] = await Promise.all([
    budgetState(ws.id),
    memberCount(ws.id),
    outboxSummary(ws.id),
    getDb().select().from(workspaceBilling).where(eq(workspaceBilling.workspaceId, ws.id)),
  ]);
  const plan = PLANS[ws.plan];
  return {
    workspace: { id: ws.id, name: ws.name, kind: ws.kind },
    plan: ws.plan,
    planLabel: plan.label,
    planState: ws.planState,
    /** Limits that apply now (Free limits while suspended). */
    effectivePlan: budget.plan,
    graceEndsAt: grace[0]?.graceEndsAt?.toISOString() ?? null,
    seats: ws.seats,
    members,
    seatPriceUsdPerMonth: PLANS.lab.seatPriceUsdPerMonth,
    computePriceUsdPerHour: PLANS.lab.computePriceUsdPerHour,
    spendCapUsd: budget.spendCapUsd,
    period: budget.period,
    usedComputeSeconds: budget.usedComputeSeconds,
    reservedComputeSeconds: budget.reservedComputeSeconds,
    includedComputeSeconds: budget.includedComputeSeconds,
    spendUsd: budget.spendUsd,
    reservedUsd: budget.reservedUsd,
    hasPaymentAccount: Boolean(ws.stripeCustomerId),
    hasSubscription: Boolean(ws.stripeSubscriptionId),
    meterEvents: outbox,
    canManageBilling: caller.role === "owner" || caller.role === "billing_admin",
  };
}
