import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { readJson, route } from "@/server/http/errors";
import { createFit, listFits } from "@/server/fits/service";

export const dynamic = "force-dynamic";

/** GET /api/v1/fits?datasetId=&limit=&before=: the workspace's fits, newest first. */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/fits", await listFits(caller, new URL(req.url).searchParams));
});

/** POST /api/v1/fits { datasetId, network, computation, sweepParameter, fit: [{ parameter, initial, min, max }], options? } -> 202 { id, status, estimate }. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("POST /api/v1/fits", await createFit(caller, await readJson(req)), { status: 202 });
});
