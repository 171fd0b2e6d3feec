import { getCaller } from "@/server/auth";
import { attachment } from "@/server/http/content-disposition";
import { route } from "@/server/http/errors";
import { getOriginalCsv } from "@/server/datasets/service";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/datasets/{id}/original: the uploaded file, byte for byte. */
export const GET = route(async (req: Request, ctx: Ctx) => {
  const caller = await getCaller(req);
  const { id } = await ctx.params;
  const { filename, csv } = await getOriginalCsv(caller, id);
  return new Response(csv, {
    headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": attachment(filename, "dataset.csv") },
  });
});
