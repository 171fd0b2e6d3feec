import "@/server/server-only";
import { NextResponse } from "next/server";
import { env } from "@/env";
import { handleClerkWebhook } from "@/server/auth/webhooks";
import { ApiError, route } from "@/server/http/errors";
import { countingFailures } from "@/server/http/rate-limit";

export const dynamic = "force-dynamic";

/**
 * POST /api/webhooks/clerk: Clerk's user, organization and membership events (signed). A bad or
 * missing signature: 400, counted against the sender's failed-request budget (429 once it is spent).
 */
export const POST = route((req: Request) =>
  countingFailures(req, async () => {
    const body = await req.text();
    if (body.length > 1_000_000) throw new ApiError("payload_too_large", "Webhook body is over 1 MB.");
    return NextResponse.json(await handleClerkWebhook(env().CLERK_WEBHOOK_SECRET, req.headers, body));
  }),
);
