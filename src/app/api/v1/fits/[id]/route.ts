import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { route } from "@/server/http/errors";
import { getFit } from "@/server/fits/service";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/fits/{id} -> { status, progress, result: { parameters: [{ parameter, value, stderr }], chi2PerDof, correlation, curve, ... }, ... } */
export const GET = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/fits/{id}", await getFit(caller, (await ctx.params).id));
});
