import "@/server/server-only";
import { and, eq, sql } from "drizzle-orm";
import Stripe from "stripe";
import { env } from "@/env";
import { getDb } from "@/server/db";
import { stripeEvents, workspaceBilling, workspaces } from "@/server/db/schema";
import { ApiError } from "@/server/http/errors";
import { BILLING_RULES, STRIPE_OBJECTS } from "./config";
import { getStripe, stripeToApiError } from "./stripe";

/**
 * Stripe webhooks: the raw body's signature is verified with the SDK, the event is stored once
 * (its id is the primary key) and applied in the same transaction, so a replayed or retried
 * event changes nothing the second time, and an event that fails to apply is not stored (Stripe
 * retries it).
 *
 * A signature proves who sent the event, not that what it says is still true (a leaked secret,
 * an old event replayed). So before a checkout, subscription or invoice event changes a plan,
 * its object is retrieved through the SDK and only what Stripe answers is used: status,
 * customer, workspace id (metadata), seat quantity. An object Stripe does not know, or whose
 * customer is not the workspace's payment customer, changes nothing: the event is stored and
 * answered 200 with an `ignored: ...` outcome (Stripe need not retry it). Stripe unreachable
 * while confirming: 503 and nothing stored, so Stripe delivers it again.
 */

type Tx = Parameters<Parameters<ReturnType<typeof getDb>["transaction"]>[0]>[0];
export interface WebhookResult {
  received: true;
  eventId: string;
  type: string;
  duplicate: boolean;
  outcome: string;
}

export function verifyStripeEvent(rawBody: string, signature: string | null): Stripe.Event {
  const secret = env().STRIPE_WEBHOOK_SECRET;
  if (!secret) throw new ApiError("unavailable", "Stripe webhooks are not configured on this server (STRIPE_WEBHOOK_SECRET is missing).");
  if (!signature) throw new ApiError("bad_request", "Missing Stripe-Signature header.");
  try {
    return getStripe().webhooks.constructEvent(rawBody, signature, secret);
  } catch (err) {
    throw new ApiError("bad_request", `Webhook signature verification failed: ${(err as Error).message}`);
  }
}

export async function handleStripeWebhook(rawBody: string, signature: string | null): Promise<WebhookResult> {
  const event = verifyStripeEvent(rawBody, signature);
  const db = getDb();
  const [seen] = await db.select({ outcome: stripeEvents.outcome }).from(stripeEvents).where(eq(stripeEvents.id, event.id));
  if (seen) return { received: true, eventId: event.id, type: event.type, duplicate: true, outcome: `already applied: ${seen.outcome}` };
  // Asked before the transaction: no database connection is held while Stripe answers.
  const confirmed = await confirmWithStripe(event);
  return db.transaction(async (tx) => {
    const inserted = await tx
      .insert(stripeEvents)
      .values({
        id: event.id,
        type: event.type,
        stripeCreatedAt: new Date(event.created * 1000),
        outcome: "received",
        payload: event as unknown as Record<string, unknown>,
      })
      .onConflictDoNothing()
      .returning({ id: stripeEvents.id });
    if (inserted.length === 0) {
      const [prior] = await tx.select({ outcome: stripeEvents.outcome }).from(stripeEvents).where(eq(stripeEvents.id, event.id));
      return { received: true, eventId: event.id, type: event.type, duplicate: true, outcome: `already applied: ${prior?.outcome ?? "?"}` };
    }
    const { workspaceId, outcome } = await applyEvent(tx, event, confirmed);
    await tx.update(stripeEvents).set({ outcome, workspaceId }).where(eq(stripeEvents.id, event.id));
    return { received: true, eventId: event.id, type: event.type, duplicate: false, outcome };
  });
}

const idOf = (v: string | { id: string } | null | undefined): string | null => (v == null ? null : typeof v === "string" ? v : v.id);

/** What Stripe itself says about an event's object, retrieved through the SDK. */
export type Confirmed =
  | { kind: "checkout"; session: Stripe.Checkout.Session; subscription: Stripe.Subscription | null }
  | { kind: "subscription"; subscription: Stripe.Subscription }
  | { kind: "invoice"; invoice: Stripe.Invoice }
  /** Stripe does not know the object (or the event names none): the event changes nothing. */
  | { kind: "unknown"; reason: string }
  /** An event type that changes no plan: nothing to confirm. */
  | { kind: "none" };

const isMissing = (err: unknown) =>
  err instanceof Stripe.errors.StripeError && (err.code === "resource_missing" || (err.statusCode === 404 && err.type === "StripeInvalidRequestError"));

/** Retrieves `id` through `get`; null when Stripe answers that no such object exists. Unreachable: 503. */
async function retrieve<T>(what: string, id: string, get: (id: string) => Promise<T>): Promise<T | null> {
  try {
    return await get(id);
  } catch (err) {
    if (isMissing(err)) return null;
    throw stripeToApiError(err, `confirm the ${what} ${id} of a webhook event`);
  }
}

const STRIPE_ID = /^[A-Za-z0-9_]{3,255}$/;
/** The events that change a plan, seats or plan state: each is confirmed with Stripe first. */
const CONFIRMED_TYPES = new Set([
  "checkout.session.completed",
  "customer.subscription.created",
  "customer.subscription.updated",
  "customer.subscription.deleted",
  "invoice.paid",
  "invoice.payment_failed",
]);

export async function confirmWithStripe(event: Stripe.Event): Promise<Confirmed> {
  const object = event.data.object as { id?: unknown };
  const id = typeof object?.id === "string" ? object.id : "";
  if (!CONFIRMED_TYPES.has(event.type)) return { kind: "none" };
  if (!STRIPE_ID.test(id)) return { kind: "unknown", reason: `the event names no ${event.type.split(".")[0]} id Stripe could know` };
  const stripe = getStripe();
  if (event.type === "checkout.session.completed") {
    const session = await retrieve("Checkout Session", id, (x) => stripe.checkout.sessions.retrieve(x));
    if (!session) return { kind: "unknown", reason: `Stripe does not know Checkout Session ${id}` };
    const subId = idOf(session.subscription);
    const subscription = subId ? await retrieve("subscription", subId, (x) => stripe.subscriptions.retrieve(x)) : null;
    return { kind: "checkout", session, subscription };
  }
  if (event.type.startsWith("customer.subscription.")) {
    const subscription = await retrieve("subscription", id, (x) => stripe.subscriptions.retrieve(x));
    return subscription ? { kind: "subscription", subscription } : { kind: "unknown", reason: `Stripe does not know subscription ${id}` };
  }
  const invoice = await retrieve("invoice", id, (x) => stripe.invoices.retrieve(x));
  return invoice ? { kind: "invoice", invoice } : { kind: "unknown", reason: `Stripe does not know invoice ${id}` };
}

async function findWorkspace(
  tx: Tx,
  hints: { workspaceId?: string | null; customer?: string | null; subscription?: string | null },
): Promise<typeof workspaces.$inferSelect | null> {
  const uuid = /^[0-9a-f-]{36}$/i;
  if (hints.workspaceId && uuid.test(hints.workspaceId)) {
    const [w] = await tx.select().from(workspaces).where(eq(workspaces.id, hints.workspaceId));
    if (w) return w;
  }
  if (hints.subscription) {
    const [w] = await tx.select().from(workspaces).where(eq(workspaces.stripeSubscriptionId, hints.subscription));
    if (w) return w;
  }
  if (hints.customer) {
    const [w] = await tx.select().from(workspaces).where(eq(workspaces.stripeCustomerId, hints.customer));
    if (w) return w;
  }
  return null;
}

/** The seat quantity of a subscription: its licensed (per-seat) item. */
export function seatQuantity(sub: Pick<Stripe.Subscription, "items">): number {
  const item =
    sub.items.data.find((i) => i.price.lookup_key === STRIPE_OBJECTS.seatPriceLookupKey) ??
    sub.items.data.find((i) => i.price.recurring?.usage_type !== "metered");
  return item?.quantity ?? 0;
}

async function enterGrace(tx: Tx, workspaceId: string): Promise<string> {
  const graceEnds = new Date(Date.now() + BILLING_RULES.graceDays * 86400_000);
  await tx
    .insert(workspaceBilling)
    .values({ workspaceId, graceEndsAt: graceEnds, lastPaymentFailedAt: new Date() })
    .onConflictDoUpdate({
      target: workspaceBilling.workspaceId,
      set: {
        graceEndsAt: sql`coalesce(${workspaceBilling.graceEndsAt}, ${graceEnds.toISOString()}::timestamptz)`,
        lastPaymentFailedAt: new Date(),
        updatedAt: new Date(),
      },
    });
  const moved = await tx
    .update(workspaces)
    .set({ planState: "grace", updatedAt: new Date() })
    .where(and(eq(workspaces.id, workspaceId), eq(workspaces.planState, "active"), eq(workspaces.plan, "lab")))
    .returning({ id: workspaces.id });
  return moved.length ? `grace until ${graceEnds.toISOString()}` : "payment failed (already in grace or suspended)";
}

async function leaveGrace(tx: Tx, workspaceId: string): Promise<void> {
  await tx
    .insert(workspaceBilling)
    .values({ workspaceId, graceEndsAt: null, lastInvoicePaidAt: new Date() })
    .onConflictDoUpdate({ target: workspaceBilling.workspaceId, set: { graceEndsAt: null, lastInvoicePaidAt: new Date(), updatedAt: new Date() } });
  await tx.update(workspaces).set({ planState: "active", updatedAt: new Date() }).where(eq(workspaces.id, workspaceId));
}

type Applied = { workspaceId: string | null; outcome: string };
type Workspace = typeof workspaces.$inferSelect;

/** The workspace must already know this customer (it is created before any checkout starts). */
function customerMismatch(ws: Workspace, customer: string | null): Applied | null {
  if (customer && ws.stripeCustomerId === customer) return null;
  return {
    workspaceId: ws.id,
    outcome:
      `ignored: Stripe's customer ${customer ?? "(none)"} is not the payment customer of workspace ${ws.id} ` + `(${ws.stripeCustomerId ?? "none on record"})`,
  };
}

async function applyEvent(tx: Tx, event: Stripe.Event, confirmed: Confirmed): Promise<Applied> {
  if (confirmed.kind === "unknown") return { workspaceId: null, outcome: `ignored: ${confirmed.reason}` };
  switch (event.type) {
    case "checkout.session.completed": {
      if (confirmed.kind !== "checkout") break;
      const s = confirmed.session;
      if (s.mode !== "subscription") return { workspaceId: null, outcome: "ignored: not a subscription checkout" };
      const customer = idOf(s.customer);
      const ws = await findWorkspace(tx, { workspaceId: s.metadata?.workspace_id ?? s.client_reference_id, customer });
      if (!ws) return { workspaceId: null, outcome: "ignored: no workspace for this checkout" };
      const mismatch = customerMismatch(ws, customer);
      if (mismatch) return mismatch;
      if (s.status !== "complete" || s.payment_status === "unpaid")
        return { workspaceId: ws.id, outcome: `ignored: Stripe says Checkout Session ${s.id} is ${s.status} (${s.payment_status})` };
      const sub = confirmed.subscription;
      if (!sub || idOf(sub.customer) !== customer)
        return { workspaceId: ws.id, outcome: `ignored: Checkout Session ${s.id} has no subscription of this customer` };
      if (sub.status !== "active" && sub.status !== "trialing")
        return { workspaceId: ws.id, outcome: `ignored: subscription ${sub.id} is ${sub.status}; its own events decide the plan` };
      if (ws.plan === "lab" && ws.stripeSubscriptionId && ws.stripeSubscriptionId !== sub.id)
        return { workspaceId: ws.id, outcome: "ignored: the workspace is on another subscription" };
      const seats = seatQuantity(sub);
      await tx
        .update(workspaces)
        .set({ plan: "lab", planState: "active", stripeSubscriptionId: sub.id, seats, updatedAt: new Date() })
        .where(eq(workspaces.id, ws.id));
      return { workspaceId: ws.id, outcome: `upgraded to Lab, ${seats} seats` };
    }
    case "customer.subscription.created":
    case "customer.subscription.updated": {
      if (confirmed.kind !== "subscription") break;
      const sub = confirmed.subscription;
      const customer = idOf(sub.customer);
      const ws = await findWorkspace(tx, { subscription: sub.id, workspaceId: sub.metadata?.workspace_id, customer });
      if (!ws) return { workspaceId: null, outcome: "ignored: no workspace for this subscription" };
      const mismatch = customerMismatch(ws, customer);
      if (mismatch) return mismatch;
      if (ws.stripeSubscriptionId && ws.stripeSubscriptionId !== sub.id && ws.plan === "lab")
        return { workspaceId: ws.id, outcome: "ignored: not the group's current subscription" };
      const seats = seatQuantity(sub);
      const base = { stripeSubscriptionId: sub.id, stripeCustomerId: customer, seats, updatedAt: new Date() };
      if (sub.status === "active" || sub.status === "trialing") {
        await tx
          .update(workspaces)
          .set({ ...base, plan: "lab" })
          .where(eq(workspaces.id, ws.id));
        if (ws.planState !== "active") {
          // Only a paid invoice ends grace; an update while past due keeps the state.
          const prev = (event.data.previous_attributes ?? {}) as { status?: string };
          if (prev.status === "past_due" || prev.status === "unpaid") await leaveGrace(tx, ws.id);
        }
        return { workspaceId: ws.id, outcome: `subscription ${sub.status}, ${seats} seats` };
      }
      if (sub.status === "past_due") {
        await tx
          .update(workspaces)
          .set({ ...base, plan: "lab" })
          .where(eq(workspaces.id, ws.id));
        return { workspaceId: ws.id, outcome: `subscription past due, ${seats} seats; ${await enterGrace(tx, ws.id)}` };
      }
      if (sub.status === "unpaid" || sub.status === "incomplete_expired" || sub.status === "paused") {
        await tx
          .update(workspaces)
          .set({ ...base, planState: "suspended" })
          .where(eq(workspaces.id, ws.id));
        return { workspaceId: ws.id, outcome: `subscription ${sub.status}: Free limits` };
      }
      if (sub.status === "canceled") {
        await tx
          .update(workspaces)
          .set({ plan: "free", planState: "active", seats: 0, stripeSubscriptionId: null, updatedAt: new Date() })
          .where(eq(workspaces.id, ws.id));
        return { workspaceId: ws.id, outcome: "subscription canceled: back to Free" };
      }
      return { workspaceId: ws.id, outcome: `subscription ${sub.status}: no change` };
    }
    case "customer.subscription.deleted": {
      if (confirmed.kind !== "subscription") break;
      const sub = confirmed.subscription;
      const customer = idOf(sub.customer);
      const ws = await findWorkspace(tx, { subscription: sub.id, workspaceId: sub.metadata?.workspace_id, customer });
      if (!ws) return { workspaceId: null, outcome: "ignored: no workspace for this subscription" };
      const mismatch = customerMismatch(ws, customer);
      if (mismatch) return mismatch;
      if (ws.stripeSubscriptionId && ws.stripeSubscriptionId !== sub.id)
        return { workspaceId: ws.id, outcome: "ignored: not the group's current subscription" };
      if (sub.status !== "canceled" && sub.status !== "incomplete_expired")
        return { workspaceId: ws.id, outcome: `ignored: Stripe says subscription ${sub.id} is ${sub.status}, not ended` };
      await tx
        .update(workspaces)
        .set({ plan: "free", planState: "active", seats: 0, stripeSubscriptionId: null, updatedAt: new Date() })
        .where(eq(workspaces.id, ws.id));
      await tx.delete(workspaceBilling).where(eq(workspaceBilling.workspaceId, ws.id));
      return { workspaceId: ws.id, outcome: "subscription ended: back to Free" };
    }
    case "invoice.paid":
    case "invoice.payment_failed": {
      if (confirmed.kind !== "invoice") break;
      const inv = confirmed.invoice;
      const subId = inv.parent?.subscription_details?.subscription;
      const customer = idOf(inv.customer);
      const ws = await findWorkspace(tx, { subscription: idOf(subId ?? null), customer });
      if (!ws) return { workspaceId: null, outcome: "ignored: no workspace for this invoice" };
      const mismatch = customerMismatch(ws, customer);
      if (mismatch) return mismatch;
      const name = inv.number ?? inv.id;
      if (event.type === "invoice.paid") {
        if (inv.status !== "paid") return { workspaceId: ws.id, outcome: `ignored: Stripe says invoice ${name} is ${inv.status}, not paid` };
        const wasInGrace = ws.planState !== "active";
        await leaveGrace(tx, ws.id);
        return {
          workspaceId: ws.id,
          outcome: `invoice ${name} paid (${(inv.amount_paid / 100).toFixed(2)} ${inv.currency.toUpperCase()})${wasInGrace ? "; grace ended" : ""}`,
        };
      }
      if (inv.status === "paid" || inv.status === "void") return { workspaceId: ws.id, outcome: `ignored: Stripe says invoice ${name} is ${inv.status}` };
      return { workspaceId: ws.id, outcome: `invoice ${name} payment failed; ${await enterGrace(tx, ws.id)}` };
    }
    default:
      return { workspaceId: null, outcome: `ignored: ${event.type} is not used` };
  }
  return { workspaceId: null, outcome: `ignored: ${event.type} is not used` };
}

/** Grace periods that ended: those workspaces work under Free limits until an invoice is paid. */
export async function expireGracePeriods(now = new Date()): Promise<number> {
  const db = getDb();
  const rows = await db.execute(sql`
    update workspaces w set plan_state = 'suspended', updated_at = now()
    from workspace_billing b
    where b.workspace_id = w.id and w.plan_state = 'grace' and b.grace_ends_at is not null and b.grace_ends_at <= ${now.toISOString()}::timestamptz
    returning w.id`);
  return rows.length;
}
