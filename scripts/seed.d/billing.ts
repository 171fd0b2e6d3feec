// The demo lab's payment account (product.md demo scenario): a customer and a Lab subscription at
// the payment service, one seat per member plus metered compute, so the lab's usage is metered and
// its invoices show. Invoices are sent rather than charged (no card on file: `send_invoice`).
// Idempotent: an existing customer and live subscription are kept. Skipped without a Stripe key,
// and never done with a live key (the demo's people are invented).
import { eq, sql } from "drizzle-orm";
import type Stripe from "stripe";
import { env } from "../../src/env";
import { getStripe, stripePrices } from "../../src/server/billing/stripe";
import { seatQuantity } from "../../src/server/billing/webhooks";
import { memberships, workspaces } from "../../src/server/db/schema";
import type { SeedContext } from "./index";

async function live<T>(get: () => Promise<T>): Promise<T | null> {
  try {
    return await get();
  } catch (err) {
    if ((err as { statusCode?: number }).statusCode === 404) return null;
    throw err;
  }
}

export async function seed(ctx: SeedContext): Promise<string> {
  const key = env().STRIPE_SECRET_KEY;
  if (!key) return "skipped: STRIPE_SECRET_KEY is not set, so billing is off";
  if (key.startsWith("sk_live_") || key.startsWith("rk_live_")) return "skipped: a live Stripe key is configured; demo customers are never created there";
  const stripe = getStripe();
  const [ws] = await ctx.db.select().from(workspaces).where(eq(workspaces.id, ctx.lab.id));
  const [{ members }] = await ctx.db
    .select({ members: sql<number>`count(*)::int` })
    .from(memberships)
    .where(eq(memberships.workspaceId, ws.id));

  let customer = ws.stripeCustomerId ? await live(() => stripe.customers.retrieve(ws.stripeCustomerId!)) : null;
  if (!customer || customer.deleted) {
    customer = await stripe.customers.create(
      { name: ws.name, description: "Demo lab (invented people, synthetic data)", metadata: { workspace_id: ws.id, workspace_slug: ws.slug, demo: "true" } },
      { idempotencyKey: `triskel-demo-customer-${ws.id}` },
    );
  }
  let sub: Stripe.Subscription | null = ws.stripeSubscriptionId ? await live(() => stripe.subscriptions.retrieve(ws.stripeSubscriptionId!)) : null;
  if (sub && (sub.status === "canceled" || sub.customer !== customer.id)) sub = null;
  if (!sub) {
    const prices = await stripePrices();
    const seats = Math.max(ws.seats, members, 1);
    sub = await stripe.subscriptions.create(
      {
        customer: customer.id,
        items: [{ price: prices.seatPriceId, quantity: seats }, { price: prices.computePriceId }],
        collection_method: "send_invoice",
        days_until_due: 30,
        metadata: { workspace_id: ws.id },
      },
      { idempotencyKey: `triskel-demo-subscription-${ws.id}-${customer.id}` },
    );
  }
  const seats = seatQuantity(sub);
  await ctx.db
    .update(workspaces)
    .set({ stripeCustomerId: customer.id, stripeSubscriptionId: sub.id, plan: "lab", seats, updatedAt: new Date() })
    .where(eq(workspaces.id, ws.id));
  return `customer ${customer.id}, subscription ${sub.id} (${seats} seats for ${members} members, invoices sent, compute metered)`;
}
