import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { route } from "@/server/http/errors";
import { cancelRun } from "@/server/runs/service";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ id: string }> };

/** POST /api/v1/runs/{id}/cancel: a queued run is cancelled at once, a running one within a second. */
export const POST = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  return reply("POST /api/v1/runs/{id}/cancel", await cancelRun(caller, id), { status: 202 });
});
