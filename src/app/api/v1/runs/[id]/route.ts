import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { route } from "@/server/http/errors";
import { getRun } from "@/server/runs/service";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/runs/{id}: status, progress (0-1), result, error, compute-seconds and estimate. */
export const GET = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  return reply("GET /api/v1/runs/{id}", await getRun(caller, id), { headers: { "cache-control": "no-store" } });
});
