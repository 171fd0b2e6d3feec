import "@/server/server-only";
import Stripe from "stripe";
import { env } from "@/env";
import { ApiError } from "@/server/http/errors";
import { STRIPE_OBJECTS } from "./config";

/**
 * The one Stripe client of a process: the official SDK, pointed at api.stripe.com, or at the
 * local stand-in when STRIPE_API_HOST/PORT/PROTOCOL are set (development and tests).
 */
const globalForStripe = globalThis as unknown as { __triskelStripe?: Stripe; __triskelPrices?: Promise<StripePrices> };

export function billingConfigured(): boolean {
  return Boolean(env().STRIPE_SECRET_KEY);
}

export function getStripe(): Stripe {
  if (globalForStripe.__triskelStripe) return globalForStripe.__triskelStripe;
  const e = env();
  if (!e.STRIPE_SECRET_KEY) throw new ApiError("unavailable", "Billing is not configured on this server (STRIPE_SECRET_KEY is missing); see docs/billing.md.");
  globalForStripe.__triskelStripe = new Stripe(e.STRIPE_SECRET_KEY, {
    ...(e.STRIPE_API_HOST ? { host: e.STRIPE_API_HOST } : {}),
    ...(e.STRIPE_API_PORT ? { port: e.STRIPE_API_PORT } : {}),
    ...(e.STRIPE_API_PROTOCOL ? { protocol: e.STRIPE_API_PROTOCOL } : {}),
    maxNetworkRetries: 2,
    timeout: 20_000,
    telemetry: false,
    appInfo: { name: "Triskel" },
  });
  return globalForStripe.__triskelStripe;
}

export interface StripePrices {
  seatPriceId: string;
  computePriceId: string;
  meterId: string;
}

/** Ids of the seat price, the metered compute price and the meter (created by scripts/stripe-setup.ts). */
export function stripePrices(): Promise<StripePrices> {
  if (!globalForStripe.__triskelPrices) {
    globalForStripe.__triskelPrices = (async () => {
      const stripe = getStripe();
      const prices = await stripe.prices.list({
        lookup_keys: [STRIPE_OBJECTS.seatPriceLookupKey, STRIPE_OBJECTS.computePriceLookupKey],
        active: true,
        limit: 10,
      });
      const seat = prices.data.find((p) => p.lookup_key === STRIPE_OBJECTS.seatPriceLookupKey);
      const compute = prices.data.find((p) => p.lookup_key === STRIPE_OBJECTS.computePriceLookupKey);
      const meters = await stripe.billing.meters.list({ status: "active", limit: 100 });
      const meter = meters.data.find((m) => m.event_name === STRIPE_OBJECTS.meterEventName);
      if (!seat || !compute || !meter) {
        throw new ApiError("unavailable", "Stripe is missing Triskel's prices or billing meter; run `tsx scripts/stripe-setup.ts` (docs/billing.md).");
      }
      return { seatPriceId: seat.id, computePriceId: compute.id, meterId: meter.id };
    })().catch((err) => {
      globalForStripe.__triskelPrices = undefined;
      throw err;
    });
  }
  return globalForStripe.__triskelPrices;
}

/** For tests and the set-up script: forget cached ids (after the stand-in was reset). */
export function forgetStripePrices(): void {
  globalForStripe.__triskelPrices = undefined;
}

/** Stripe SDK errors as the API's typed errors (Stripe unreachable: 503). */
export function stripeToApiError(err: unknown, doing: string): ApiError {
  if (err instanceof ApiError) return err;
  if (err instanceof Stripe.errors.StripeError) {
    if (err.type === "StripeConnectionError" || err.type === "StripeAPIError" || (err.statusCode ?? 0) >= 500) {
      return new ApiError("unavailable", `The payment service is unreachable while trying to ${doing}; nothing was changed. Try again in a minute.`, {
        stripe: err.message,
      });
    }
    return new ApiError("bad_request", `The payment service refused to ${doing}: ${err.message}`, {
      stripe: { type: err.type, code: err.code, param: err.param },
    });
  }
  return new ApiError("internal", `Unexpected error while trying to ${doing}: ${(err as Error).message}`);
}
