import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { listInvoices } from "@/server/billing/subscriptions";
import { route } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** GET /api/v1/billing/invoices: `{ invoices, upcoming }` from Stripe (amounts in USD). */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/billing/invoices", await listInvoices(caller));
});
