import "@/server/server-only";
import { NextResponse } from "next/server";
import { env } from "@/env";
import { handleClerkWebhook } from "@/server/auth/webhooks";
import { ApiError, route } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** POST /api/webhooks/clerk: Clerk's user, organization and membership events (signed). */
export const POST = route(async (req: Request) => {
  const body = await req.text();
  if (body.length > 1_000_000) throw new ApiError("payload_too_large", "Webhook body is over 1 MB.");
  return NextResponse.json(await handleClerkWebhook(env().CLERK_WEBHOOK_SECRET, req.headers, body));
});
