import "@/server/server-only";
import { and, eq, sql } from "drizzle-orm";
import Stripe from "stripe";
import { env } from "@/env";
import { getDb } from "@/server/db";
import { stripeEvents, workspaceBilling, workspaces } from "@/server/db/schema";
import { ApiError } from "@/server/http/errors";
import { BILLING_RULES, STRIPE_OBJECTS } from "./config";
import { getStripe } from "./stripe";

/**
 * Stripe webhooks: the raw body's signature is verified with the SDK, the event is stored once
 * (its id is the primary key) and applied in the same transaction, so a replayed or retried
 * event changes nothing the second time, and an event that fails to apply is not stored (Stripe
 * retries it).
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
    const { workspaceId, outcome } = await applyEvent(tx, event);
    await tx.update(stripeEvents).set({ outcome, workspaceId }).where(eq(stripeEvents.id, event.id));
    return { received: true, eventId: event.id, type: event.type, duplicate: false, outcome };
  });
}

const idOf = (v: string | { id: string } | null | undefined): string | null => (v == null ? null : typeof v === "string" ? v : v.id);

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

async function applyEvent(tx: Tx, event: Stripe.Event): Promise<{ workspaceId: string | null; outcome: string }> {
  switch (event.type) {
    case "checkout.session.completed": {
      const s = event.data.object;
      if (s.mode !== "subscription") return { workspaceId: null, outcome: "ignored: not a subscription checkout" };
      const ws = await findWorkspace(tx, { workspaceId: s.client_reference_id ?? s.metadata?.workspace_id, customer: idOf(s.customer) });
      if (!ws) return { workspaceId: null, outcome: "ignored: no workspace for this checkout" };
      await tx
        .update(workspaces)
        .set({
          plan: "lab",
          planState: "active",
          stripeCustomerId: idOf(s.customer) ?? ws.stripeCustomerId,
          stripeSubscriptionId: idOf(s.subscription) ?? ws.stripeSubscriptionId,
          updatedAt: new Date(),
        })
        .where(eq(workspaces.id, ws.id));
      return { workspaceId: ws.id, outcome: "upgraded to Lab" };
    }
    case "customer.subscription.created":
    case "customer.subscription.updated": {
      const sub = event.data.object;
      const ws = await findWorkspace(tx, { workspaceId: sub.metadata?.workspace_id, subscription: sub.id, customer: idOf(sub.customer) });
      if (!ws) return { workspaceId: null, outcome: "ignored: no workspace for this subscription" };
      if (ws.stripeSubscriptionId && ws.stripeSubscriptionId !== sub.id && ws.plan === "lab")
        return { workspaceId: ws.id, outcome: "ignored: not the workspace's current subscription" };
      const seats = seatQuantity(sub);
      const base = { stripeSubscriptionId: sub.id, stripeCustomerId: idOf(sub.customer), seats, updatedAt: new Date() };
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
      const sub = event.data.object;
      const ws = await findWorkspace(tx, { subscription: sub.id, workspaceId: sub.metadata?.workspace_id, customer: idOf(sub.customer) });
      if (!ws) return { workspaceId: null, outcome: "ignored: no workspace for this subscription" };
      if (ws.stripeSubscriptionId && ws.stripeSubscriptionId !== sub.id)
        return { workspaceId: ws.id, outcome: "ignored: not the workspace's current subscription" };
      await tx
        .update(workspaces)
        .set({ plan: "free", planState: "active", seats: 0, stripeSubscriptionId: null, updatedAt: new Date() })
        .where(eq(workspaces.id, ws.id));
      await tx.delete(workspaceBilling).where(eq(workspaceBilling.workspaceId, ws.id));
      return { workspaceId: ws.id, outcome: "subscription ended: back to Free" };
    }
    case "invoice.paid": {
      const inv = event.data.object;
      const subId = inv.parent?.subscription_details?.subscription;
      const ws = await findWorkspace(tx, { subscription: idOf(subId ?? null), customer: idOf(inv.customer) });
      if (!ws) return { workspaceId: null, outcome: "ignored: no workspace for this invoice" };
      const wasInGrace = ws.planState !== "active";
      await leaveGrace(tx, ws.id);
      return {
        workspaceId: ws.id,
        outcome:
          `invoice ${inv.number ?? inv.id} paid (${(inv.amount_paid / 100).toFixed(2)} ${inv.currency.toUpperCase()})` + `${wasInGrace ? "; grace ended" : ""}`,
      };
    }
    case "invoice.payment_failed": {
      const inv = event.data.object;
      const subId = inv.parent?.subscription_details?.subscription;
      const ws = await findWorkspace(tx, { subscription: idOf(subId ?? null), customer: idOf(inv.customer) });
      if (!ws) return { workspaceId: null, outcome: "ignored: no workspace for this invoice" };
      return { workspaceId: ws.id, outcome: `invoice ${inv.number ?? inv.id} payment failed; ${await enterGrace(tx, ws.id)}` };
    }
    default:
      return { workspaceId: null, outcome: `ignored: ${event.type} is not used` };
  }
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
