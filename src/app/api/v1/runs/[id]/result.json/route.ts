import { getCaller } from "@/server/auth";
import { attachment } from "@/server/http/content-disposition";
import { route } from "@/server/http/errors";
import { runResultJson } from "@/server/runs/service";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/runs/{id}/result.json: the result as a file, exactly as the command line prints it. */
export const GET = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  const body = await runResultJson(caller, id);
  return new Response(body, {
    headers: { "content-type": "application/json; charset=utf-8", "content-disposition": attachment(`triskel-run-${id}.json`, "triskel-run.json") },
  });
});
