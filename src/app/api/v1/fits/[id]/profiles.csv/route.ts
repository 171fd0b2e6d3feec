import { getCaller } from "@/server/auth";
import { attachment } from "@/server/http/content-disposition";
import { route } from "@/server/http/errors";
import { fitProfilesCsv } from "@/server/fits/service";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/fits/{id}/profiles.csv: the chi2 profile of every fitted parameter. */
export const GET = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { filename, csv } = await fitProfilesCsv(caller, (await ctx.params).id);
  return new Response(csv, { headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": attachment(filename, "fit-profiles.csv") } });
});
