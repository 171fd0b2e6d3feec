// The Stripe stand-in through the real SDK: shapes, errors, idempotency keys, meter identifiers,
// event summaries, invoice preview and signed webhooks (development and tests only).
import { createHmac } from "node:crypto";
import Stripe from "stripe";
import { describe, expect, it } from "vitest";

const port = Number(process.env.STRIPE_FAKE_PORT);
const fakeUrl = `http://127.0.0.1:${port}`;
const stripe = new Stripe(process.env.STRIPE_SECRET_KEY!, { host: "127.0.0.1", port, protocol: "http", maxNetworkRetries: 0 });

async function meter() {
  const list = await stripe.billing.meters.list({ status: "active" });
  const m = list.data.find((x) => x.event_name === "compute_seconds");
  if (!m) throw new Error("set-up script did not create the compute_seconds meter");
  return m;
}

describe("Stripe stand-in through the SDK", () => {
  it("has the products, prices and meter from the set-up script, with a metered price on the meter", async () => {
    const m = await meter();
    expect(m.default_aggregation.formula).toBe("sum");
    const prices = await stripe.prices.list({ lookup_keys: ["triskel_lab_seat_monthly", "triskel_compute_seconds_metered"] });
    expect(prices.data).toHaveLength(2);
    const seat = prices.data.find((p) => p.lookup_key === "triskel_lab_seat_monthly")!;
    const compute = prices.data.find((p) => p.lookup_key === "triskel_compute_seconds_metered")!;
    expect(seat.unit_amount).toBe(2400);
    expect(seat.recurring?.usage_type).toBe("licensed");
    expect(compute.recurring?.usage_type).toBe("metered");
    expect(compute.recurring?.meter).toBe(m.id);
  });

  it("answers unknown ids with Stripe's error shape and status", async () => {
    const err = await stripe.customers.retrieve("cus_doesnotexist").catch((e) => e);
    expect(err).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
    expect(err.statusCode).toBe(404);
    expect(err.code).toBe("resource_missing");
    expect(err.message).toContain("No such customer");
    const raw = await fetch(`${fakeUrl}/v1/customers/cus_nope`, { headers: { authorization: `Bearer ${process.env.STRIPE_SECRET_KEY}` } });
    const body = await raw.json();
    expect(body.error).toMatchObject({ type: "invalid_request_error", code: "resource_missing", param: "id" });
    const unauth = await fetch(`${fakeUrl}/v1/customers`, { headers: { authorization: "Bearer sk_test_wrong" } });
    expect(unauth.status).toBe(401);
  });

  it("replays a request with the same idempotency key and refuses the key with other parameters", async () => {
    const key = `it-${Date.now()}-${Math.random()}`;
    const a = await stripe.customers.create({ name: "Idempotent Lab (test)" }, { idempotencyKey: key });
    const b = await stripe.customers.create({ name: "Idempotent Lab (test)" }, { idempotencyKey: key });
    expect(b.id).toBe(a.id);
    const err = await stripe.customers.create({ name: "Another name" }, { idempotencyKey: key }).catch((e) => e);
    expect(err).toBeInstanceOf(Stripe.errors.StripeIdempotencyError);
    expect(err.statusCode).toBe(400);
  });

  it("keeps meter event identifiers unique and sums events per period in summaries", async () => {
    const m = await meter();
    const customer = await stripe.customers.create({ name: "Meter check (test)" });
    const now = Math.floor(Date.now() / 1000);
    const id = `it-${now}-${Math.random()}`;
    await stripe.billing.meterEvents.create({
      event_name: "compute_seconds",
      identifier: id,
      timestamp: now - 120,
      payload: { stripe_customer_id: customer.id, value: "12.5" },
    });
    await stripe.billing.meterEvents.create({ event_name: "compute_seconds", timestamp: now - 60, payload: { stripe_customer_id: customer.id, value: "7.5" } });
    const dup = await stripe.billing.meterEvents
      .create({ event_name: "compute_seconds", identifier: id, timestamp: now, payload: { stripe_customer_id: customer.id, value: "100" } })
      .catch((e) => e);
    expect(dup).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
    expect(dup.code).toBe("resource_already_exists");
    const start = Math.floor((now - 3600) / 60) * 60;
    const end = Math.ceil((now + 60) / 60) * 60;
    const summaries = await stripe.billing.meters.listEventSummaries(m.id, { customer: customer.id, start_time: start, end_time: end });
    expect(summaries.data[0].aggregated_value).toBeCloseTo(20, 6);
    const old = await stripe.billing.meterEvents
      .create({ event_name: "compute_seconds", timestamp: now - 40 * 86400, payload: { stripe_customer_id: customer.id, value: "1" } })
      .catch((e) => e);
    expect(old.param).toBe("timestamp");
  });

  it("answers the retrieve calls the webhook handler confirms events with (unknown ids: 404 resource_missing)", async () => {
    for (const get of [
      () => stripe.checkout.sessions.retrieve("cs_test_doesnotexist"),
      () => stripe.subscriptions.retrieve("sub_doesnotexist"),
      () => stripe.invoices.retrieve("in_doesnotexist"),
    ]) {
      const err = await get().catch((e) => e);
      expect(err).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
      expect([err.statusCode, err.code]).toEqual([404, "resource_missing"]);
    }
  });

  it("decodes nested brackets and indexed arrays (checkout line items) and previews an invoice", async () => {
    const prices = await stripe.prices.list({ lookup_keys: ["triskel_lab_seat_monthly", "triskel_compute_seconds_metered"] });
    const seat = prices.data.find((p) => p.lookup_key === "triskel_lab_seat_monthly")!;
    const compute = prices.data.find((p) => p.lookup_key === "triskel_compute_seconds_metered")!;
    const customer = await stripe.customers.create({ name: "Checkout check (test)", metadata: { purpose: "integration" } });
    expect(customer.metadata.purpose).toBe("integration");
    const bad = await stripe.checkout.sessions
      .create({ mode: "subscription", customer: customer.id, success_url: "http://127.0.0.1/ok", line_items: [{ price: compute.id, quantity: 3 }] })
      .catch((e) => e);
    expect(bad.param).toBe("line_items[0][quantity]");
    const session = await stripe.checkout.sessions.create({
      mode: "subscription",
      customer: customer.id,
      success_url: "http://127.0.0.1/ok?session={CHECKOUT_SESSION_ID}",
      line_items: [{ price: seat.id, quantity: 3 }, { price: compute.id }],
      subscription_data: { metadata: { workspace_id: "not-a-workspace" } },
    });
    expect(session.url).toMatch(/\/checkout\/cs_test_/);
    const pay = await fetch(`${session.url}/pay`, { method: "POST", redirect: "manual" });
    expect(pay.status).toBe(303);
    expect(pay.headers.get("location")).toBe(`http://127.0.0.1/ok?session=${session.id}`);
    const done = await stripe.checkout.sessions.retrieve(session.id);
    expect(done.status).toBe("complete");
    const sub = await stripe.subscriptions.retrieve(done.subscription as string);
    expect(sub.metadata.workspace_id).toBe("not-a-workspace");
    const seatItem = sub.items.data.find((i) => i.price.id === seat.id)!;
    expect(seatItem.quantity).toBe(3);
    expect(seatItem.current_period_end).toBeGreaterThan(seatItem.current_period_start);
    const preview = await stripe.invoices.createPreview({ customer: customer.id, subscription: sub.id });
    expect(preview.total).toBe(3 * 2400);
    const invoices = await stripe.invoices.list({ customer: customer.id });
    expect(invoices.data[0].status).toBe("paid");
  });

  it("signs webhooks as HMAC-SHA256 over `timestamp.payload` that the SDK verifies", async () => {
    const secret = process.env.STRIPE_WEBHOOK_SECRET!;
    const payload = JSON.stringify({ id: "evt_check", object: "event" });
    const header = stripe.webhooks.generateTestHeaderString({ payload, secret });
    const [t, v1] = header.split(",").map((p) => p.split("=")[1]);
    expect(v1).toBe(createHmac("sha256", secret).update(`${t}.${payload}`).digest("hex"));
    const deliveries = await (await fetch(`${fakeUrl}/_fake/deliveries?type=checkout.session.completed`)).json();
    expect(deliveries.data.length).toBeGreaterThan(0);
  });
});
