// The Stripe endpoints Triskel uses, on the in-memory Store. Every handler takes the decoded
// form body (or query) and answers an object shaped like the SDK's type, or throws FakeError.
import type { ParsedQs } from "qs";
import {
  addMonth,
  badParam,
  FakeError,
  missing,
  newId,
  nowSeconds,
  Store,
  type FakeCheckoutSession,
  type FakeCustomer,
  type FakeInvoice,
  type FakeInvoiceLine,
  type FakeList,
  type FakeMeter,
  type FakePrice,
  type FakeProduct,
  type FakeSubscription,
  type FakeSubscriptionItem,
} from "./store";

export type Params = ParsedQs;
export type Emit = (type: string, object: unknown, previous?: Record<string, unknown>) => string;

const str = (v: unknown): string | undefined => (typeof v === "string" ? v : undefined);
function req(p: Params, name: string): string {
  const v = p[name];
  if (typeof v !== "string" || v === "") throw badParam(name, `Missing required param: ${name}.`, "parameter_missing");
  return v;
}
function int(p: Params, name: string, fallback?: number): number | undefined {
  const v = p[name];
  if (v === undefined) return fallback;
  if (typeof v !== "string" || !/^-?\d+$/.test(v)) throw badParam(name, `Invalid integer: ${String(v)}`);
  return Number(v);
}
function metadataOf(v: unknown): Record<string, string> {
  if (v === undefined || v === "") return {};
  if (typeof v !== "object" || v === null || Array.isArray(v)) throw badParam("metadata", "Invalid object");
  const out: Record<string, string> = {};
  for (const [k, val] of Object.entries(v)) if (typeof val === "string") out[k] = val;
  return out;
}
/** qs gives arrays for `a[0]=..`; accept both arrays and index-keyed objects. */
function arrayOf(v: unknown): unknown[] {
  if (v === undefined) return [];
  if (Array.isArray(v)) return v;
  if (typeof v === "object" && v !== null)
    return Object.keys(v)
      .sort((a, b) => Number(a) - Number(b))
      .map((k) => (v as Record<string, unknown>)[k]);
  return [v];
}

export function list<T extends { created?: number }>(items: T[], url: string, p: Params): FakeList<T> {
  const limit = Math.min(100, Math.max(1, int(p, "limit", 10)!));
  let sorted = [...items].sort((a, b) => (b.created ?? 0) - (a.created ?? 0));
  const after = str(p.starting_after);
  if (after) {
    const i = sorted.findIndex((x) => (x as { id?: string }).id === after);
    sorted = i >= 0 ? sorted.slice(i + 1) : sorted;
  }
  return { object: "list", data: sorted.slice(0, limit), has_more: sorted.length > limit, url };
}

export class FakeApi {
  constructor(
    readonly store: Store,
    readonly publicUrl: string,
    readonly emit: Emit,
  ) {}

  // ---- customers
  createCustomer(p: Params): FakeCustomer {
    const c: FakeCustomer = {
      id: newId("cus"),
      object: "customer",
      created: nowSeconds(),
      email: str(p.email) ?? null,
      name: str(p.name) ?? null,
      description: str(p.description) ?? null,
      metadata: metadataOf(p.metadata),
      livemode: false,
    };
    this.store.customers.set(c.id, c);
    this.emit("customer.created", c);
    return c;
  }
  customer(id: string): FakeCustomer {
    const c = this.store.customers.get(id);
    if (!c) throw missing("customer", id);
    return c;
  }
  updateCustomer(id: string, p: Params): FakeCustomer {
    const c = this.customer(id);
    if (p.email !== undefined) c.email = str(p.email) || null;
    if (p.name !== undefined) c.name = str(p.name) || null;
    if (p.metadata !== undefined) c.metadata = { ...c.metadata, ...metadataOf(p.metadata) };
    return c;
  }
  listCustomers(p: Params) {
    const email = str(p.email);
    return list(
      [...this.store.customers.values()].filter((c) => !email || c.email === email),
      "/v1/customers",
      p,
    );
  }

  // ---- products and prices
  createProduct(p: Params): FakeProduct {
    const id = str(p.id) ?? newId("prod");
    if (this.store.products.has(id)) throw new FakeError(400, "invalid_request_error", `Product already exists.`, "resource_already_exists", "id");
    const t = nowSeconds();
    const prod: FakeProduct = {
      id,
      object: "product",
      active: p.active !== "false",
      created: t,
      updated: t,
      name: req(p, "name"),
      description: str(p.description) ?? null,
      metadata: metadataOf(p.metadata),
      livemode: false,
      type: "service",
      unit_label: str(p.unit_label) ?? null,
    };
    this.store.products.set(id, prod);
    return prod;
  }
  product(id: string): FakeProduct {
    const prod = this.store.products.get(id);
    if (!prod) throw missing("product", id);
    return prod;
  }
  listProducts(p: Params) {
    return list(
      [...this.store.products.values()].filter((x) => p.active === undefined || String(x.active) === p.active),
      "/v1/products",
      p,
    );
  }
  createPrice(p: Params): FakePrice {
    const product = req(p, "product");
    this.product(product);
    const currency = req(p, "currency").toLowerCase();
    const lookupKey = str(p.lookup_key) ?? null;
    const rec = p.recurring as Params | undefined;
    let recurring: FakePrice["recurring"] = null;
    if (rec) {
      const interval = req(rec, "interval") as "month";
      if (!["day", "week", "month", "year"].includes(interval))
        throw badParam("recurring[interval]", `Invalid recurring[interval]: must be one of day, week, month, or year`);
      const usageType = (str(rec.usage_type) ?? "licensed") as "licensed" | "metered";
      const meter = str(rec.meter) ?? null;
      if (usageType === "metered" && !meter)
        throw badParam("recurring[meter]", "A metered price must be attached to a billing meter (recurring[meter]).", "parameter_missing");
      if (meter && !this.store.meters.has(meter)) throw missing("billing meter", meter, "recurring[meter]");
      recurring = { interval, interval_count: int(rec, "interval_count", 1)!, usage_type: usageType, meter };
    }
    const unitAmount = int(p, "unit_amount");
    const unitDecimal = str(p.unit_amount_decimal);
    if (unitAmount === undefined && unitDecimal === undefined)
      throw badParam("unit_amount", "Missing required param: unit_amount or unit_amount_decimal.", "parameter_missing");
    if (unitDecimal !== undefined && !/^\d+(\.\d{1,12})?$/.test(unitDecimal))
      throw badParam("unit_amount_decimal", "Invalid decimal: at most 12 decimal places");
    if (lookupKey) {
      const holder = [...this.store.prices.values()].find((x) => x.lookup_key === lookupKey);
      if (holder) {
        if (p.transfer_lookup_key !== "true") throw badParam("lookup_key", `A price (\`${holder.id}\`) already uses that lookup key.`, "lookup_key_exists");
        holder.lookup_key = null;
      }
    }
    const price: FakePrice = {
      id: newId("price"),
      object: "price",
      active: true,
      created: nowSeconds(),
      currency,
      lookup_key: lookupKey,
      metadata: metadataOf(p.metadata),
      nickname: str(p.nickname) ?? null,
      product,
      type: recurring ? "recurring" : "one_time",
      unit_amount: unitAmount ?? (unitDecimal && Number.isInteger(Number(unitDecimal)) ? Number(unitDecimal) : null),
      unit_amount_decimal: unitDecimal ?? String(unitAmount),
      billing_scheme: "per_unit",
      livemode: false,
      recurring,
    };
    this.store.prices.set(price.id, price);
    return price;
  }
  price(id: string): FakePrice {
    const price = this.store.prices.get(id);
    if (!price) throw missing("price", id);
    return price;
  }
  listPrices(p: Params) {
    const keys = arrayOf(p.lookup_keys).map(String);
    const product = str(p.product);
    const items = [...this.store.prices.values()].filter(
      (x) =>
        (keys.length === 0 || (x.lookup_key !== null && keys.includes(x.lookup_key))) &&
        (!product || x.product === product) &&
        (p.active === undefined || String(x.active) === p.active),
    );
    return list(items, "/v1/prices", p);
  }

  // ---- billing meters and meter events
  createMeter(p: Params): FakeMeter {
    const eventName = req(p, "event_name");
    if ([...this.store.meters.values()].some((m) => m.event_name === eventName && m.status === "active")) {
      throw badParam("event_name", `An active meter with event_name '${eventName}' already exists.`, "resource_already_exists");
    }
    const agg = p.default_aggregation as Params | undefined;
    const formula = agg ? req(agg, "formula") : undefined;
    if (!formula) throw badParam("default_aggregation[formula]", "Missing required param: default_aggregation[formula].", "parameter_missing");
    if (!["sum", "count", "last"].includes(formula))
      throw badParam("default_aggregation[formula]", "Invalid default_aggregation[formula]: must be one of sum, count or last");
    const t = nowSeconds();
    const m: FakeMeter = {
      id: newId("mtr"),
      object: "billing.meter",
      created: t,
      updated: t,
      display_name: req(p, "display_name"),
      event_name: eventName,
      status: "active",
      livemode: false,
      customer_mapping: { type: "by_id", event_payload_key: str((p.customer_mapping as Params | undefined)?.event_payload_key) ?? "stripe_customer_id" },
      default_aggregation: { formula: formula as "sum" },
      value_settings: { event_payload_key: str((p.value_settings as Params | undefined)?.event_payload_key) ?? "value" },
    };
    this.store.meters.set(m.id, m);
    return m;
  }
  meter(id: string): FakeMeter {
    const m = this.store.meters.get(id);
    if (!m) throw missing("billing meter", id);
    return m;
  }
  listMeters(p: Params) {
    return list(
      [...this.store.meters.values()].filter((m) => !p.status || m.status === p.status),
      "/v1/billing/meters",
      p,
    );
  }
  createMeterEvent(p: Params) {
    const eventName = req(p, "event_name");
    const meter = [...this.store.meters.values()].find((m) => m.event_name === eventName && m.status === "active");
    if (!meter) throw badParam("event_name", `No active meter was found with event_name '${eventName}'.`, "resource_missing");
    const payload = (p.payload ?? {}) as Params;
    const customerKey = meter.customer_mapping.event_payload_key;
    const valueKey = meter.value_settings.event_payload_key;
    const customer = str(payload[customerKey]);
    if (!customer) throw badParam(`payload[${customerKey}]`, `Missing required param: payload[${customerKey}].`, "parameter_missing");
    this.customer(customer);
    const value = str(payload[valueKey]);
    if (value === undefined || !/^\d+(\.\d+)?$/.test(value))
      throw badParam(`payload[${valueKey}]`, `payload[${valueKey}] must be a non-negative number, as a string.`);
    const now = nowSeconds();
    const timestamp = int(p, "timestamp", now)!;
    if (timestamp < now - 35 * 86400) throw badParam("timestamp", "Timestamp must be within the past 35 calendar days.", "timestamp_too_far_in_past");
    if (timestamp > now + 5 * 60) throw badParam("timestamp", "Timestamp must not be more than 5 minutes in the future.", "timestamp_in_future");
    const identifier = str(p.identifier) ?? newId("mev");
    if (this.store.meterIdentifiers.has(identifier)) {
      throw badParam("identifier", `An event already exists with identifier ${identifier}.`, "resource_already_exists");
    }
    const ev = {
      object: "billing.meter_event" as const,
      created: now,
      event_name: eventName,
      identifier,
      livemode: false,
      payload: { ...(payload as Record<string, string>) },
      timestamp,
    };
    this.store.meterIdentifiers.add(identifier);
    this.store.meterEvents.push(ev);
    return ev;
  }
  meterEventSummaries(meterId: string, p: Params) {
    const meter = this.meter(meterId);
    const customer = req(p, "customer");
    const start = int(p, "start_time");
    const end = int(p, "end_time");
    if (start === undefined) throw badParam("start_time", "Missing required param: start_time.", "parameter_missing");
    if (end === undefined) throw badParam("end_time", "Missing required param: end_time.", "parameter_missing");
    if (start % 60 !== 0 || end % 60 !== 0) throw badParam("start_time", "start_time and end_time must be aligned with minute boundaries.");
    const events = this.eventsFor(meter, customer, start, end);
    const sum = events.reduce((a, e) => a + Number(e.payload[meter.value_settings.event_payload_key]), 0);
    const value = meter.default_aggregation.formula === "count" ? events.length : sum;
    const summary = {
      id: newId("mtrusg"),
      object: "billing.meter_event_summary" as const,
      aggregated_value: value,
      start_time: start,
      end_time: end,
      livemode: false,
      meter: meter.id,
    };
    return { object: "list" as const, data: [summary], has_more: false, url: `/v1/billing/meters/${meter.id}/event_summaries` };
  }
  eventsFor(meter: FakeMeter, customer: string, start: number, end: number) {
    return this.store.meterEvents.filter(
      (e) => e.event_name === meter.event_name && e.payload[meter.customer_mapping.event_payload_key] === customer && e.timestamp >= start && e.timestamp < end,
    );
  }

  // ---- checkout and portal
  createCheckoutSession(p: Params): FakeCheckoutSession {
    const mode = req(p, "mode");
    if (mode !== "subscription") throw badParam("mode", "This stand-in supports mode=subscription only.");
    const successUrl = req(p, "success_url");
    const items = arrayOf(p.line_items).map((raw, i) => {
      const li = raw as Params;
      const price = str(li.price);
      if (!price) throw badParam(`line_items[${i}][price]`, `Missing required param: line_items[${i}][price].`, "parameter_missing");
      const pr = this.price(price);
      const quantity = int(li, "quantity");
      if (pr.recurring?.usage_type === "metered" && quantity !== undefined)
        throw badParam(`line_items[${i}][quantity]`, "Quantity should not be specified where usage_type is `metered`.");
      if (pr.recurring?.usage_type !== "metered" && (quantity === undefined || quantity < 1))
        throw badParam(`line_items[${i}][quantity]`, "Quantity is required for a licensed price and must be at least 1.");
      return { price, quantity };
    });
    if (items.length === 0) throw badParam("line_items", "Missing required param: line_items.", "parameter_missing");
    const customer = str(p.customer) ?? null;
    if (customer) this.customer(customer);
    const id = newId("cs_test");
    const t = nowSeconds();
    const session: FakeCheckoutSession = {
      id,
      object: "checkout.session",
      created: t,
      customer,
      mode: "subscription",
      status: "open",
      payment_status: "unpaid",
      success_url: successUrl,
      cancel_url: str(p.cancel_url) ?? null,
      url: `${this.publicUrl}/checkout/${id}`,
      client_reference_id: str(p.client_reference_id) ?? null,
      metadata: metadataOf(p.metadata),
      livemode: false,
      expires_at: t + 24 * 3600,
      currency: this.price(items[0].price).currency,
      subscription: null,
      line_items_input: items,
      subscription_metadata: metadataOf((p.subscription_data as Params | undefined)?.metadata),
    };
    this.store.checkoutSessions.set(id, session);
    return session;
  }
  checkoutSession(id: string): FakeCheckoutSession {
    const s = this.store.checkoutSessions.get(id);
    if (!s) throw missing("checkout.session", id);
    return s;
  }
  /** The hosted page's pay button: the customer pays, the subscription starts. */
  completeCheckout(id: string): FakeCheckoutSession {
    const s = this.checkoutSession(id);
    if (s.status !== "open") throw new FakeError(400, "invalid_request_error", `This Checkout Session is ${s.status}.`, "checkout_session_not_open");
    if (!s.customer) s.customer = this.createCustomer({}).id;
    const sub = this.startSubscription(s.customer as string, s.line_items_input, s.subscription_metadata, "charge_automatically", s.currency ?? "usd");
    s.status = "complete";
    s.payment_status = "paid";
    s.subscription = sub.id;
    this.emit("checkout.session.completed", this.publicSession(s));
    this.announceSubscription(sub);
    return s;
  }
  /** POST /v1/subscriptions: a subscription started without Checkout (e.g. `send_invoice` collection, no card on file). */
  createSubscription(p: Params): FakeSubscription {
    const customer = req(p, "customer");
    this.customer(customer);
    const items = arrayOf(p.items).map((raw, i) => {
      const it = raw as Params;
      const price = str(it.price);
      if (!price) throw badParam(`items[${i}][price]`, "Missing required param: items[][price].", "parameter_missing");
      this.price(price);
      return { price, quantity: int(it, "quantity") };
    });
    if (!items.length) throw badParam("items", "Missing required param: items.", "parameter_missing");
    const collection = str(p.collection_method) ?? "charge_automatically";
    if (collection !== "charge_automatically" && collection !== "send_invoice")
      throw badParam("collection_method", "Invalid collection_method: must be one of charge_automatically or send_invoice.");
    if (collection === "send_invoice" && int(p, "days_until_due") === undefined)
      throw badParam("days_until_due", "days_until_due is required when collection_method is send_invoice.", "parameter_missing");
    const currency = items.map((i) => this.price(i.price).currency)[0] ?? "usd";
    const sub = this.startSubscription(customer, items, metadataOf(p.metadata), collection, currency);
    this.announceSubscription(sub);
    return sub;
  }
  /** The subscription and its first invoice (licensed items only: metered use is billed at the period's end). */
  private startSubscription(
    customer: string,
    lineItems: { price: string; quantity?: number }[],
    metadata: Record<string, string>,
    collection: "charge_automatically" | "send_invoice",
    currency: string,
  ): FakeSubscription {
    const t = nowSeconds();
    const subId = newId("sub");
    const sub: FakeSubscription = {
      id: subId,
      object: "subscription",
      created: t,
      currency,
      customer,
      metadata,
      status: "active",
      start_date: t,
      cancel_at_period_end: false,
      canceled_at: null,
      ended_at: null,
      livemode: false,
      latest_invoice: null,
      collection_method: collection,
      items: { object: "list", data: [], has_more: false, url: `/v1/subscription_items?subscription=${subId}` },
    };
    for (const li of lineItems) sub.items.data.push(this.newItem(sub, li.price, li.quantity, t, addMonth(t)));
    this.store.subscriptions.set(subId, sub);
    return sub;
  }
  /** Events of a new subscription and its first invoice; collected at once unless it is sent to be paid later. */
  private announceSubscription(sub: FakeSubscription) {
    const t = sub.start_date;
    const invoice = this.invoiceFor(sub, t, addMonth(t), "subscription_create", { licensedOnly: true });
    this.store.invoices.set(invoice.id, invoice);
    sub.latest_invoice = invoice.id;
    this.emit("customer.subscription.created", sub);
    this.emit("invoice.created", invoice);
    if (sub.collection_method === "charge_automatically") this.settle(invoice, sub);
  }
  publicSession(s: FakeCheckoutSession) {
    const { line_items_input: _li, subscription_metadata: _sm, ...rest } = s;
    return rest;
  }
  createPortalSession(p: Params) {
    const customer = req(p, "customer");
    this.customer(customer);
    const id = newId("bps");
    const s = {
      id,
      object: "billing_portal.session" as const,
      created: nowSeconds(),
      customer,
      return_url: str(p.return_url) ?? null,
      url: `${this.publicUrl}/portal/${id}`,
      livemode: false,
    };
    this.store.portalSessions.set(id, s);
    return s;
  }

  // ---- subscriptions
  newItem(sub: FakeSubscription, priceId: string, quantity: number | undefined, start: number, end: number): FakeSubscriptionItem {
    return {
      id: newId("si"),
      object: "subscription_item",
      created: start,
      current_period_start: start,
      current_period_end: end,
      metadata: {},
      quantity,
      subscription: sub.id,
      price: this.price(priceId),
    };
  }
  subscription(id: string): FakeSubscription {
    const s = this.store.subscriptions.get(id);
    if (!s) throw missing("subscription", id);
    return s;
  }
  listSubscriptions(p: Params) {
    const customer = str(p.customer);
    return list(
      [...this.store.subscriptions.values()].filter((s) => !customer || s.customer === customer),
      "/v1/subscriptions",
      p,
    );
  }
  updateSubscription(id: string, p: Params): FakeSubscription {
    const sub = this.subscription(id);
    if (sub.status === "canceled") throw badParam("subscription", "A canceled subscription can not be updated.", "resource_missing");
    const previous: Record<string, unknown> = {};
    const items = arrayOf(p.items);
    if (items.length) previous.items = JSON.parse(JSON.stringify(sub.items));
    items.forEach((raw, i) => {
      const it = raw as Params;
      const itemId = str(it.id);
      const quantity = int(it, "quantity");
      if (itemId) {
        const item = sub.items.data.find((x) => x.id === itemId);
        if (!item) throw missing("subscription_item", itemId, `items[${i}][id]`);
        if (it.deleted === "true") {
          sub.items.data = sub.items.data.filter((x) => x.id !== itemId);
          return;
        }
        if (quantity !== undefined) {
          if (item.price.recurring?.usage_type === "metered")
            throw badParam(`items[${i}][quantity]`, "Quantity should not be specified where usage_type is `metered`.");
          if (quantity < 0) throw badParam(`items[${i}][quantity]`, "Invalid positive integer");
          item.quantity = quantity;
        }
      } else {
        const price = str(it.price);
        if (!price) throw badParam(`items[${i}][price]`, "Missing required param: items[][price] or items[][id].", "parameter_missing");
        const first = sub.items.data[0];
        sub.items.data.push(
          this.newItem(sub, price, quantity, first?.current_period_start ?? nowSeconds(), first?.current_period_end ?? addMonth(nowSeconds())),
        );
      }
    });
    if (p.metadata !== undefined) {
      previous.metadata = { ...sub.metadata };
      sub.metadata = { ...sub.metadata, ...metadataOf(p.metadata) };
    }
    if (p.cancel_at_period_end !== undefined) {
      previous.cancel_at_period_end = sub.cancel_at_period_end;
      sub.cancel_at_period_end = p.cancel_at_period_end === "true";
    }
    this.emit("customer.subscription.updated", sub, previous);
    return sub;
  }
  cancelSubscription(id: string): FakeSubscription {
    const sub = this.subscription(id);
    if (sub.status === "canceled") throw badParam("subscription", "This subscription is already canceled.");
    const t = nowSeconds();
    sub.status = "canceled";
    sub.canceled_at = t;
    sub.ended_at = t;
    this.emit("customer.subscription.deleted", sub);
    return sub;
  }

  // ---- invoices
  invoiceFor(
    sub: FakeSubscription,
    start: number,
    end: number,
    reason: FakeInvoice["billing_reason"],
    opts: { licensedOnly?: boolean; preview?: boolean } = {},
  ): FakeInvoice {
    const lines: FakeInvoiceLine[] = [];
    for (const item of sub.items.data) {
      const price = item.price;
      const product = this.store.products.get(price.product as string);
      let quantity: number;
      if (price.recurring?.usage_type === "metered") {
        if (opts.licensedOnly) continue;
        const meter = this.meter(price.recurring.meter!);
        quantity = this.eventsFor(meter, sub.customer as string, start, end).reduce((a, e) => a + Number(e.payload[meter.value_settings.event_payload_key]), 0);
      } else {
        quantity = item.quantity ?? 1;
      }
      const amount = Math.round(quantity * Number(price.unit_amount_decimal ?? price.unit_amount ?? 0));
      lines.push({
        id: newId("il"),
        object: "line_item",
        amount,
        currency: price.currency,
        description: `${Number.isInteger(quantity) ? quantity : quantity.toFixed(3)} × ${product?.name ?? price.product}`,
        quantity: Math.round(quantity),
        livemode: false,
        metadata: {},
        period: { start, end },
        pricing: {
          type: "price_details",
          price_details: { price: price.id, product: price.product as string },
          unit_amount_decimal: price.unit_amount_decimal,
        },
      });
    }
    const total = lines.reduce((a, l) => a + l.amount, 0);
    const id = opts.preview ? `upcoming_${sub.id}` : newId("in");
    return {
      id,
      object: "invoice",
      created: nowSeconds(),
      currency: sub.currency,
      customer: sub.customer as string,
      status: opts.preview ? "draft" : "open",
      amount_due: total,
      amount_paid: 0,
      amount_remaining: total,
      subtotal: total,
      total,
      period_start: start,
      period_end: end,
      number: opts.preview ? null : `TRSK-${String(++this.store.invoiceCounter).padStart(4, "0")}`,
      hosted_invoice_url: opts.preview ? null : `${this.publicUrl}/invoice/${id}`,
      livemode: false,
      attempt_count: 0,
      attempted: false,
      billing_reason: reason,
      collection_method: sub.collection_method,
      metadata: {},
      lines: { object: "list", data: lines, has_more: false, url: `/v1/invoices/${id}/lines` },
      parent: { type: "subscription_details", subscription_details: { subscription: sub.id, metadata: sub.metadata } },
    };
  }
  /** Tries to collect an open invoice: paid, or payment failed (customer marked failing). */
  settle(invoice: FakeInvoice, sub: FakeSubscription) {
    invoice.attempted = true;
    invoice.attempt_count += 1;
    const failing = this.store.failingCustomers.has(invoice.customer as string);
    if (failing && invoice.amount_due > 0) {
      this.emit("invoice.payment_failed", invoice);
      if (sub.status === "active") {
        sub.status = "past_due";
        this.emit("customer.subscription.updated", sub, { status: "active" });
      }
    } else {
      invoice.status = "paid";
      invoice.amount_paid = invoice.amount_due;
      invoice.amount_remaining = 0;
      this.emit("invoice.paid", invoice);
      if (sub.status === "past_due" || sub.status === "unpaid") {
        const was = sub.status;
        sub.status = "active";
        this.emit("customer.subscription.updated", sub, { status: was });
      }
    }
  }
  invoice(id: string): FakeInvoice {
    const inv = this.store.invoices.get(id);
    if (!inv) throw missing("invoice", id);
    return inv;
  }
  listInvoices(p: Params) {
    const customer = str(p.customer);
    const subscription = str(p.subscription);
    const status = str(p.status);
    const items = [...this.store.invoices.values()].filter(
      (i) =>
        (!customer || i.customer === customer) &&
        (!subscription || i.parent?.subscription_details.subscription === subscription) &&
        (!status || i.status === status),
    );
    return list(items, "/v1/invoices", p);
  }
  previewInvoice(p: Params): FakeInvoice {
    const customer = req(p, "customer");
    this.customer(customer);
    const subId = str(p.subscription) ?? [...this.store.subscriptions.values()].find((s) => s.customer === customer && s.status !== "canceled")?.id;
    if (!subId) throw new FakeError(404, "invalid_request_error", "No upcoming invoices for customer: " + customer, "invoice_upcoming_none");
    const sub = this.subscription(subId);
    if (sub.customer !== customer) throw badParam("subscription", "The subscription does not belong to this customer.");
    if (sub.status === "canceled") throw new FakeError(404, "invalid_request_error", "No upcoming invoices for customer: " + customer, "invoice_upcoming_none");
    const item = sub.items.data[0];
    return this.invoiceFor(sub, item.current_period_start, item.current_period_end, "upcoming", { preview: true });
  }

  // ---- test control: close the current period of a subscription
  advancePeriod(subId: string) {
    const sub = this.subscription(subId);
    if (sub.status === "canceled") throw badParam("subscription", "This subscription is canceled.");
    const item = sub.items.data[0];
    const start = item.current_period_start;
    const end = item.current_period_end;
    const invoice = this.invoiceFor(sub, start, end, "subscription_cycle");
    this.store.invoices.set(invoice.id, invoice);
    sub.latest_invoice = invoice.id;
    const previous = { items: JSON.parse(JSON.stringify(sub.items)) };
    for (const it of sub.items.data) {
      it.current_period_start = end;
      it.current_period_end = addMonth(end);
    }
    this.emit("customer.subscription.updated", sub, previous);
    this.emit("invoice.created", invoice);
    this.settle(invoice, sub);
    return invoice;
  }
  /** Portal: new payment details; retry the open invoices. */
  fixPayment(customer: string) {
    this.store.failingCustomers.delete(customer);
    for (const inv of this.store.invoices.values()) {
      if (inv.customer === customer && inv.status === "open") {
        const subId = inv.parent?.subscription_details.subscription;
        const sub = subId ? this.store.subscriptions.get(subId) : undefined;
        if (sub) this.settle(inv, sub);
      }
    }
  }
}
