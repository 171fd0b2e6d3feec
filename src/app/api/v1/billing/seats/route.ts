import { reply } from "@/server/http/reply";
import { getCaller, requirePermission } from "@/server/auth";
import { billingOverview } from "@/server/billing/subscriptions";
import { route } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** GET /api/v1/billing/seats: `{ seats, members, seatPriceUsdPerMonth }`; seats follow membership. */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  requirePermission(caller, "seats.manage");
  const o = await billingOverview(caller);
  return reply("GET /api/v1/billing/seats", { seats: o.seats, members: o.members, seatPriceUsdPerMonth: o.seatPriceUsdPerMonth });
});
