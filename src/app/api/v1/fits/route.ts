import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { ApiError, readJson, route } from "@/server/http/errors";
import { createFit, estimateFit, listFits } from "@/server/fits/service";

export const dynamic = "force-dynamic";

/** GET /api/v1/fits?datasetId=&limit=&before=: the workspace's fits, newest first. */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/fits", await listFits(caller, new URL(req.url).searchParams));
});

/** POST /api/v1/fits { datasetId, network, computation, sweepParameter, fit: [{ parameter, initial, min, max }], options? } -> 202 { id, status, estimate }; `?dryRun=true` only checks and estimates (200). */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  const body = await readJson(req);
  if (isDryRun(req)) return reply("POST /api/v1/fits?dryRun=true", await estimateFit(caller, body));
  return reply("POST /api/v1/fits", await createFit(caller, body), { status: 202 });
});

/** `?dryRun=true`: every check and the estimate, nothing written (200). */
function isDryRun(req: Request): boolean {
  const v = new URL(req.url).searchParams.get("dryRun");
  if (v === null || v === "false") return false;
  if (v === "true" || v === "") return true;
  throw new ApiError("bad_request", `dryRun: must be true or false (got "${v}").`, { field: "dryRun" });
}
