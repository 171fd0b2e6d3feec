import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { startCheckout } from "@/server/billing/subscriptions";
import { route } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** POST /api/v1/billing/checkout: start the upgrade to Lab; answers `{ url, sessionId, seats }` (open `url`). */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("POST /api/v1/billing/checkout", await startCheckout(caller), { status: 201 });
});
