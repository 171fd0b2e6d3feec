import { NextResponse } from "next/server";
import { getCaller } from "@/server/auth";
import { listInvoices } from "@/server/billing/subscriptions";
import { route } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** GET /api/v1/billing/invoices: `{ invoices, upcoming }` from Stripe (amounts in USD). */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return NextResponse.json(await listInvoices(caller));
});
