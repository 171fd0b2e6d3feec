import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { route } from "@/server/http/errors";
import { cancelFit } from "@/server/fits/service";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ id: string }> };

/** POST /api/v1/fits/{id}/cancel: a queued fit is cancelled at once, a running one at its next model evaluation. */
export const POST = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  return reply("POST /api/v1/fits/{id}/cancel", await cancelFit(caller, (await ctx.params).id));
});
