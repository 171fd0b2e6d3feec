import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { attachment } from "@/server/http/content-disposition";
import { route } from "@/server/http/errors";
import { exportFit } from "@/server/fits/service";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/fits/{id}/export: JSON report with every setting, the engine version and the data hash. */
export const GET = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  return reply("GET /api/v1/fits/{id}/export", await exportFit(caller, id), {
    headers: { "content-disposition": attachment(`fit-${id.slice(0, 8)}-report.json`, "fit-report.json") },
  });
});
