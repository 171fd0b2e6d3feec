import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { billingOverview } from "@/server/billing/subscriptions";
import { route } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** GET /api/v1/billing: plan, state (grace), seats and members, spend cap, this period's use (docs/billing.md). */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/billing", await billingOverview(caller));
});
