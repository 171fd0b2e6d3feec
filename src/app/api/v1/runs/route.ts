import { reply } from "@/server/http/reply";
import { getCaller } from "@/server/auth";
import { ApiError, readJson, route } from "@/server/http/errors";
import { createRun, estimateRun, listRuns } from "@/server/runs/service";

export const dynamic = "force-dynamic";

/** GET /api/v1/runs?status=&kind=&networkId=&sweepId=&includeSweepPoints=&limit=&cursor= */
export const GET = route(async (req: Request) => {
  const caller = await getCaller(req);
  return reply("GET /api/v1/runs", await listRuns(caller, new URL(req.url).searchParams));
});

/** POST /api/v1/runs `{ network | networkId, networkVersion?, computation }`: 202 with id, status and estimate; `?dryRun=true` only checks and estimates. */
export const POST = route(async (req: Request) => {
  const caller = await getCaller(req);
  const body = await readJson(req, 2_000_000);
  if (isDryRun(req)) return reply("POST /api/v1/runs?dryRun=true", await estimateRun(caller, body));
  const created = await createRun(caller, body);
  return reply("POST /api/v1/runs", created, { status: 202, headers: { location: `/api/v1/runs/${created.id}` } });
});

/** `?dryRun=true`: every check and the estimate, nothing written (200). */
function isDryRun(req: Request): boolean {
  const v = new URL(req.url).searchParams.get("dryRun");
  if (v === null || v === "false") return false;
  if (v === "true" || v === "") return true;
  throw new ApiError("bad_request", `dryRun: must be true or false (got "${v}").`, { field: "dryRun" });
}
