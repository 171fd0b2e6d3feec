// Creates, idempotently, the Stripe objects Triskel bills with: the billing meter
// (compute_seconds, sum), the seat product with its per-seat monthly price, and the compute
// product with its metered price on that meter. The Free plan is "no subscription", so it needs
// nothing. Figures come from src/shared/plans.ts. Safe to run again: it changes nothing that
// already matches, and moves a lookup key to a new price when a figure changed.
import Stripe from "stripe";
import { PLANS } from "../src/shared/plans";
import { loadEnvOrExit } from "../src/env";
import { STRIPE_OBJECTS } from "../src/server/billing/config";
import { getStripe } from "../src/server/billing/stripe";

const e = loadEnvOrExit();
if (!e.STRIPE_SECRET_KEY) {
  console.log("[stripe-setup] STRIPE_SECRET_KEY is not set: billing stays off; nothing to do");
  process.exit(0);
}
const stripe = getStripe();
const lab = PLANS.lab;
const seatCents = Math.round(lab.seatPriceUsdPerMonth * 100);
/** Cents per compute-second, as Stripe's unit_amount_decimal (at most 12 decimal places). */
const computeCentsPerSecond = ((lab.computePriceUsdPerHour * 100) / 3600).toFixed(12).replace(/0+$/, "").replace(/\.$/, "");

async function ensureMeter(): Promise<Stripe.Billing.Meter> {
  for await (const m of stripe.billing.meters.list({ status: "active", limit: 100 })) {
    if (m.event_name === STRIPE_OBJECTS.meterEventName) return m;
  }
  return stripe.billing.meters.create(
    {
      display_name: STRIPE_OBJECTS.meterDisplayName,
      event_name: STRIPE_OBJECTS.meterEventName,
      default_aggregation: { formula: "sum" },
      customer_mapping: { type: "by_id", event_payload_key: "stripe_customer_id" },
      value_settings: { event_payload_key: "value" },
    },
    { idempotencyKey: `triskel-setup-meter-${STRIPE_OBJECTS.meterEventName}` },
  );
}

async function ensureProduct(id: string, name: string, description: string): Promise<Stripe.Product> {
  try {
    return await stripe.products.retrieve(id);
  } catch (err) {
    if ((err as { code?: string }).code !== "resource_missing") throw err;
    return stripe.products.create({ id, name, description }, { idempotencyKey: `triskel-setup-product-${id}` });
  }
}

async function ensurePrice(lookupKey: string, wanted: Stripe.PriceCreateParams, matches: (p: Stripe.Price) => boolean): Promise<Stripe.Price> {
  const found = await stripe.prices.list({ lookup_keys: [lookupKey], active: true, limit: 1 });
  const current = found.data[0];
  if (current && matches(current)) return current;
  return stripe.prices.create({ ...wanted, lookup_key: lookupKey, transfer_lookup_key: Boolean(current) });
}

const meter = await ensureMeter();
await ensureProduct(STRIPE_OBJECTS.seatProductId, "Triskel Lab seat", "One paying member of a Lab workspace, per month.");
await ensureProduct(STRIPE_OBJECTS.computeProductId, "Triskel compute", "Compute-seconds spent by workers on runs, metered.");
const seat = await ensurePrice(
  STRIPE_OBJECTS.seatPriceLookupKey,
  {
    product: STRIPE_OBJECTS.seatProductId,
    currency: "usd",
    unit_amount: seatCents,
    recurring: { interval: "month", usage_type: "licensed" },
    nickname: "Lab seat, monthly",
  },
  (p) => p.unit_amount === seatCents && p.recurring?.interval === "month",
);
const compute = await ensurePrice(
  STRIPE_OBJECTS.computePriceLookupKey,
  {
    product: STRIPE_OBJECTS.computeProductId,
    currency: "usd",
    unit_amount_decimal: Stripe.Decimal.from(computeCentsPerSecond),
    recurring: { interval: "month", usage_type: "metered", meter: meter.id },
    nickname: "Compute-seconds, metered",
  },
  (p) => p.recurring?.meter === meter.id && Number(String(p.unit_amount_decimal)) === Number(computeCentsPerSecond),
);
console.log(
  `[stripe-setup] meter ${meter.id} (${meter.event_name}), seat price ${seat.id} (${seatCents} cents/month), ` +
    `compute price ${compute.id} (${computeCentsPerSecond} cents/compute-second)`,
);
