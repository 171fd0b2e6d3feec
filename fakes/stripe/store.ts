// In-memory state of the Stripe stand-in: the objects Triskel uses, shaped after the SDK's own
// types (Pick<Stripe.X, ...>, so a field the SDK does not know is a compile error here).
import { randomBytes } from "node:crypto";
import type Stripe from "stripe";

export class FakeError extends Error {
  constructor(
    readonly status: number,
    readonly type: "invalid_request_error" | "api_error" | "idempotency_error" | "authentication_error" | "card_error",
    message: string,
    readonly code?: string,
    readonly param?: string,
  ) {
    super(message);
  }
}

export const missing = (what: string, id: string, param = "id") =>
  new FakeError(404, "invalid_request_error", `No such ${what}: '${id}'`, "resource_missing", param);
export const badParam = (param: string, message: string, code = "parameter_invalid") => new FakeError(400, "invalid_request_error", message, code, param);

export function newId(prefix: string): string {
  return `${prefix}_${randomBytes(12).toString("base64url").replace(/[-_]/g, "x")}`;
}
export const nowSeconds = () => Math.floor(Date.now() / 1000);

/** One calendar month later, in seconds (UTC), as Stripe's monthly billing anchors do. */
export function addMonth(epochSeconds: number): number {
  const d = new Date(epochSeconds * 1000);
  const day = d.getUTCDate();
  const next = new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, 1, d.getUTCHours(), d.getUTCMinutes(), d.getUTCSeconds()));
  const lastDay = new Date(Date.UTC(next.getUTCFullYear(), next.getUTCMonth() + 1, 0)).getUTCDate();
  next.setUTCDate(Math.min(day, lastDay));
  return Math.floor(next.getTime() / 1000);
}

export type FakeCustomer = Pick<Stripe.Customer, "id" | "object" | "created" | "email" | "name" | "metadata" | "livemode" | "description">;
export type FakeProduct = Pick<
  Stripe.Product,
  "id" | "object" | "active" | "created" | "updated" | "name" | "description" | "metadata" | "livemode" | "type" | "unit_label"
>;
export type FakePrice = Pick<
  Stripe.Price,
  | "id"
  | "object"
  | "active"
  | "created"
  | "currency"
  | "lookup_key"
  | "metadata"
  | "nickname"
  | "product"
  | "type"
  | "unit_amount"
  | "billing_scheme"
  | "livemode"
> & {
  /** On the wire a decimal is a string; the SDK turns it into its Decimal type. */
  unit_amount_decimal: string | null;
  recurring: Pick<Stripe.Price.Recurring, "interval" | "interval_count" | "meter" | "usage_type"> | null;
};
export type FakeMeter = Pick<Stripe.Billing.Meter, "id" | "object" | "created" | "updated" | "display_name" | "event_name" | "status" | "livemode"> & {
  customer_mapping: Pick<Stripe.Billing.Meter.CustomerMapping, "event_payload_key" | "type">;
  default_aggregation: Pick<Stripe.Billing.Meter.DefaultAggregation, "formula">;
  value_settings: Pick<Stripe.Billing.Meter.ValueSettings, "event_payload_key">;
};
export type FakeMeterEvent = Pick<Stripe.Billing.MeterEvent, "object" | "created" | "event_name" | "identifier" | "livemode" | "payload" | "timestamp">;
export type FakeSubscriptionItem = Pick<
  Stripe.SubscriptionItem,
  "id" | "object" | "created" | "current_period_start" | "current_period_end" | "metadata" | "quantity" | "subscription"
> & { price: FakePrice };
export type FakeList<T> = { object: "list"; data: T[]; has_more: boolean; url: string };
export type FakeSubscription = Pick<
  Stripe.Subscription,
  | "id"
  | "object"
  | "created"
  | "currency"
  | "customer"
  | "metadata"
  | "status"
  | "start_date"
  | "cancel_at_period_end"
  | "canceled_at"
  | "ended_at"
  | "livemode"
  | "latest_invoice"
  | "collection_method"
> & {
  items: FakeList<FakeSubscriptionItem>;
};
export type FakeInvoiceLine = Pick<Stripe.InvoiceLineItem, "id" | "object" | "amount" | "currency" | "description" | "quantity" | "livemode" | "metadata"> & {
  period: { start: number; end: number };
  pricing: { type: "price_details"; price_details: { price: string; product: string }; unit_amount_decimal: string | null };
};
export type FakeInvoice = Pick<
  Stripe.Invoice,
  | "id"
  | "object"
  | "created"
  | "currency"
  | "customer"
  | "status"
  | "amount_due"
  | "amount_paid"
  | "amount_remaining"
  | "subtotal"
  | "total"
  | "period_start"
  | "period_end"
  | "number"
  | "hosted_invoice_url"
  | "livemode"
  | "attempt_count"
  | "attempted"
  | "billing_reason"
  | "collection_method"
  | "metadata"
> & {
  lines: FakeList<FakeInvoiceLine>;
  parent: { type: "subscription_details"; subscription_details: { subscription: string; metadata: Record<string, string> } } | null;
};
export type FakeCheckoutSession = Pick<
  Stripe.Checkout.Session,
  | "id"
  | "object"
  | "created"
  | "customer"
  | "mode"
  | "status"
  | "payment_status"
  | "success_url"
  | "cancel_url"
  | "url"
  | "client_reference_id"
  | "metadata"
  | "livemode"
  | "expires_at"
  | "currency"
> & {
  subscription: string | null;
  line_items_input: { price: string; quantity?: number }[];
  subscription_metadata: Record<string, string>;
};
export type FakePortalSession = Pick<Stripe.BillingPortal.Session, "id" | "object" | "created" | "customer" | "return_url" | "url" | "livemode">;
export type FakeEvent = Pick<Stripe.Event, "id" | "object" | "api_version" | "created" | "livemode" | "pending_webhooks" | "type"> & {
  data: { object: unknown; previous_attributes?: Record<string, unknown> };
  request: { id: string | null; idempotency_key: string | null };
};
export interface Delivery {
  id: string;
  eventId: string;
  type: string;
  attempts: number;
  status: "pending" | "delivered" | "failed";
  lastResponseStatus: number | null;
  lastError: string | null;
  deliveredAt: number | null;
}

export interface StoredResponse {
  method: string;
  path: string;
  body: string;
  status: number;
  response: unknown;
}

export class Store {
  customers = new Map<string, FakeCustomer>();
  products = new Map<string, FakeProduct>();
  prices = new Map<string, FakePrice>();
  meters = new Map<string, FakeMeter>();
  meterEvents: FakeMeterEvent[] = [];
  meterIdentifiers = new Set<string>();
  subscriptions = new Map<string, FakeSubscription>();
  checkoutSessions = new Map<string, FakeCheckoutSession>();
  portalSessions = new Map<string, FakePortalSession>();
  invoices = new Map<string, FakeInvoice>();
  events: FakeEvent[] = [];
  deliveries: Delivery[] = [];
  idempotency = new Map<string, StoredResponse>();
  /** Customers whose next payments fail (test control). */
  failingCustomers = new Set<string>();
  invoiceCounter = 0;

  /** Plain JSON of everything (for the state file of a developer's instance). */
  serialize(): string {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(this)) out[k] = v instanceof Map ? { $map: [...v.entries()] } : v instanceof Set ? { $set: [...v] } : v;
    return JSON.stringify(out);
  }

  static deserialize(text: string): Store {
    const store = new Store();
    const data = JSON.parse(text) as Record<string, unknown>;
    const target = store as unknown as Record<string, unknown>;
    for (const [k, v] of Object.entries(data)) {
      if (!(k in store)) continue;
      const box = v as { $map?: [string, unknown][]; $set?: string[] } | null;
      if (box && typeof box === "object" && box.$map) target[k] = new Map(box.$map);
      else if (box && typeof box === "object" && box.$set) target[k] = new Set(box.$set);
      else target[k] = v;
    }
    return store;
  }
}
