import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { readJson, route } from "@/server/http/errors";
import { periodOfDataset } from "@/server/datasets/service";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/** POST /api/v1/datasets/{id}/period { backgroundDegree?, zeroPadFactor?, minCyclesInWindow? } (empty body allowed). */
export const POST = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  const text = req.headers.get("content-length") === "0" ? "" : await req.clone().text();
  const body = text.trim() ? await readJson(req, 10_000) : {};
  return reply("POST /api/v1/datasets/{id}/period", await periodOfDataset(caller, id, body));
});
