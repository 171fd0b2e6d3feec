import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { route } from "@/server/http/errors";
import { getDataset } from "@/server/datasets/service";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/datasets/{id}: summary, mapping and the curve in engine units (x in T/V/m^-2, y in e2/h). */
export const GET = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  return reply("GET /api/v1/datasets/{id}", await getDataset(caller, id));
});
