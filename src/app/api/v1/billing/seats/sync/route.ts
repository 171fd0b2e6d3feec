import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { syncSeats } from "@/server/billing/subscriptions";
import { route } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** POST /api/v1/billing/seats/sync: set the subscription's seats to the member count now `{ seats, members }`. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("POST /api/v1/billing/seats/sync", await syncSeats(caller));
});
