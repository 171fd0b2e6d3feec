import { getCaller } from "@/server/auth";
import { attachment } from "@/server/http/content-disposition";
import { route } from "@/server/http/errors";
import { sweepResultsCsv } from "@/server/sweeps/service";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/sweeps/{id}/results.csv: one row per point, unit-suffixed columns; `#` header lines state the inputs, engine version and input hash. */
export const GET = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  const { filename, body } = await sweepResultsCsv(caller, id);
  return new Response(body, { headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": attachment(filename, "sweep.csv") } });
});
