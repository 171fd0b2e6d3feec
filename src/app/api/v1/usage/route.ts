import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { parsePeriod, usageReport } from "@/server/billing/usage";
import { route } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/** GET /api/v1/usage[?period=YYYY-MM]: compute-seconds and cost this period, per member and per day. */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  const period = parsePeriod(new URL(req.url).searchParams.get("period"));
  return reply("GET /api/v1/usage", await usageReport(caller, period));
});
