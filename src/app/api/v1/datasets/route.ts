import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { route } from "@/server/http/errors";
import { createDatasetFromRequest, listDatasets } from "@/server/datasets/service";

export const dynamic = "force-dynamic";

/** GET /api/v1/datasets?limit=&before=: the workspace's datasets, newest first. */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/datasets", await listDatasets(caller, new URL(req.url).searchParams));
});

/** POST /api/v1/datasets (multipart/form-data): file, name, xColumn, xUnit, yColumn, yUnit, sigmaColumn?, temperatureColumn? -> 201. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("POST /api/v1/datasets", await createDatasetFromRequest(caller, req), { status: 201 });
});
