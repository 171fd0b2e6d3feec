import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { route } from "@/server/http/errors";
import { getSweep } from "@/server/sweeps/service";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/sweeps/{id}: axes, status, progress, counts and the result grid (readable while it runs). */
export const GET = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  return reply("GET /api/v1/sweeps/{id}", await getSweep(caller, id), { headers: { "cache-control": "no-store" } });
});
