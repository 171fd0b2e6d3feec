import { NextResponse } from "next/server";
import { handleStripeWebhook } from "@/server/billing/webhooks";
import { route } from "@/server/http/errors";
import { countingFailures } from "@/server/http/rate-limit";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

/**
 * POST /api/webhooks/stripe: raw body, Stripe-Signature verified; each event applied once. Bad
 * signature: 400, counted against the sender's failed-request budget (429 once it is spent).
 */
export const POST = route((req: Request) =>
  countingFailures(req, async () => {
    const raw = await req.text();
    const result = await handleStripeWebhook(raw, req.headers.get("stripe-signature"));
    return NextResponse.json(result);
  }),
);
