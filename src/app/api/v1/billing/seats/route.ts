import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { getSeats, setSeats } from "@/server/billing/subscriptions";
import { readJson, route, zodToApiError } from "@/server/http/errors";
import { seatsInput } from "@/server/billing/inputs";

export const dynamic = "force-dynamic";

/** GET /api/v1/billing/seats: seats bought and taken, the least allowed now, and their price. */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/billing/seats", await getSeats(caller));
});

/** PUT /api/v1/billing/seats `{ seats }`: buy or give back seats (prorated by Stripe); 409 below members + open invitations. */
export const PUT = route(async (req: Request) => {
  const caller = await getCaller(req);
  const parsed = seatsInput.safeParse(await readJson(req, 10_000));
  if (!parsed.success) throw zodToApiError(parsed.error);
  return reply("PUT /api/v1/billing/seats", await setSeats(caller, parsed.data.seats));
});
