import { NextResponse } from "next/server";
import { handleStripeWebhook } from "@/server/billing/webhooks";
import { route } from "@/server/http/errors";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

/** POST /api/webhooks/stripe: raw body, Stripe-Signature verified; each event applied once. Bad signature: 400. */
export const POST = route(async (req: Request) => {
  const raw = await req.text();
  const result = await handleStripeWebhook(raw, req.headers.get("stripe-signature"));
  return NextResponse.json(result);
});
