import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { route } from "@/server/http/errors";
import { cancelSweep } from "@/server/sweeps/service";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ id: string }> };

/** POST /api/v1/sweeps/{id}/cancel: queued points are cancelled at once, running ones within a second. */
export const POST = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  return reply("POST /api/v1/sweeps/{id}/cancel", await cancelSweep(caller, id), { status: 202 });
});
