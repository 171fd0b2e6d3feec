import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { openPortal } from "@/server/billing/subscriptions";
import { route } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** POST /api/v1/billing/portal: a customer-portal link (payment details, invoices) `{ url }`. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("POST /api/v1/billing/portal", await openPortal(caller), { status: 201 });
});
